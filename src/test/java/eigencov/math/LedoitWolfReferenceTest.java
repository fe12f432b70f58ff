package eigencov.math;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import java.util.Random;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;
import org.junit.jupiter.api.Test;

/**
 * {@link LedoitWolf} and the window's sample covariance against scikit-learn 1.2.1
 * ({@code sklearn.covariance.ledoit_wolf}, {@code empirical_covariance}) and numpy 1.24.2 on two outside
 * datasets: hedgefund2005 (K = 16 > T = 12, so the inverse goes through Woodbury's identity with a
 * T x T inner matrix) and smallcap (K = 20 < T = 60: an n x n Cholesky factor). The numbers were made
 * once by {@code scripts/reference/ledoit_wolf_reference.py} into
 * {@code src/test/resources/reference/ledoit_wolf/sklearn.json} (see its SOURCE.md).
 */
class LedoitWolfReferenceTest {
    /** Two double-precision routes to the same numbers (numpy's LAPACK, our Gram and Cholesky): 1e-10 relative. */
    private static final double RELATIVE = 1e-10;

    private static JsonNode reference(String dataset) {
        return Fixtures.json("ledoit_wolf", "sklearn.json").path("datasets").path(dataset);
    }

    private static WindowCovariance window(String dataset) {
        JsonNode ref = reference(dataset);
        ReturnPanel p = Fixtures.panel(dataset, "returns.csv", Fixtures.strings(ref.path("assets")));
        return WindowCovariance.of(p.values(), p.rows(), p.cols(), EvaluationCheckValuesTest.equal(p.rows()), null);
    }

    private static void close(double expected, double actual, double scale, String what) {
        assertEquals(expected, actual, RELATIVE * Math.max(Math.abs(scale), Double.MIN_NORMAL), what);
    }

    @ParameterizedTest
    @ValueSource(strings = {"hedgefund2005", "smallcap"})
    void intensity_and_every_entry_equal_scikit_learn(String dataset) {
        JsonNode ref = reference(dataset);
        WindowCovariance w = window(dataset);
        LedoitWolf lw = w.ledoitWolf();
        close(ref.path("shrinkage").asDouble(), lw.shrinkage(), 1, "shrinkage (sklearn)");
        double[] shrunk = Fixtures.matrix(ref.path("shrunkCovariance"));
        double[] sample = Fixtures.matrix(ref.path("sampleCovariance"));
        int k = ref.path("K").asInt();
        double scale = Fixtures.maxAbs(shrunk);
        for (int i = 0; i < k; i++) {
            for (int j = 0; j < k; j++) {
                close(shrunk[i * k + j], lw.entry(i, j), scale, "Sigma_LW[" + i + "," + j + "] (sklearn)");
                close(sample[i * k + j], w.entry(i, j), scale, "S[" + i + "," + j + "] (sklearn empirical_covariance)");
            }
            close(shrunk[i * k + i], lw.variance(i), scale, "variance(" + i + ")");
            close(sample[i * k + i], w.sample().variance(i), scale, "sample variance(" + i + ")");
        }
        // a portfolio variance equals w' Sigma w from sklearn's matrix
        double[] x = probe(k);
        double direct = 0;
        for (int i = 0; i < k; i++) for (int j = 0; j < k; j++) direct += x[i] * shrunk[i * k + j] * x[j];
        close(direct, lw.variance(x), direct, "w' Sigma_LW w");
    }

    @ParameterizedTest
    @ValueSource(strings = {"hedgefund2005", "smallcap"})
    void inverse_log_determinant_and_minimum_variance_equal_numpy(String dataset) {
        JsonNode ref = reference(dataset);
        checkInverse(ref.path("ledoitWolfInverse"), window(dataset).ledoitWolf().inverse(), ref.path("K").asInt());
    }

    @Test
    void sample_inverse_exists_only_with_fewer_names_than_dates_and_then_equals_numpy() {
        checkInverse(reference("smallcap").path("sampleInverse"), window("smallcap").sample().inverse(), 20);
        assertNull(window("hedgefund2005").sample().inverse(), "K = 16 >= T = 12: S is singular");
    }

    private static void checkInverse(JsonNode ref, CovarianceInverse inv, int k) {
        assertNotNull(inv);
        double logDet = ref.path("logDeterminant").asDouble();
        close(logDet, inv.logDeterminant(), logDet, "ln|Sigma| (numpy slogdet)");
        double q = ref.path("quadraticForm").asDouble();
        close(q, inv.quadraticForm(probe(k)), q, "x' Sigma^-1 x (numpy solve)");
        double[] w = new double[k];
        double var = inv.minimumVariance(1.0, w);
        double[] expected = Fixtures.doubles(ref.path("minimumVarianceWeights"));
        double scale = Fixtures.maxAbs(expected);
        for (int i = 0; i < k; i++) close(expected[i], w[i], scale, "minimum-variance weight " + i + " (numpy solve)");
        close(ref.path("minimumVariance").asDouble(), var, var, "minimum variance (numpy)");
    }

    /** The script's probe vector: x_i = 0.01 (-1)^i (1 + i/K). */
    private static double[] probe(int k) {
        double[] x = new double[k];
        for (int i = 0; i < k; i++) x[i] = 0.01 * (i % 2 == 0 ? 1 : -1) * (1 + (double) i / k);
        return x;
    }

    @Test
    void weighted_intensity_is_the_definition_evaluated_directly() {
        // Half-life weights: bbar^2 = sum_t w_t^2 ||x_t x_t' - S||^2 with ||A||^2 = tr(AA')/n, evaluated here from its
        // definition on K x K matrices (the class derives it from the T x T Gram matrix instead). With gaps, too.
        Random rnd = new Random(7);
        int dates = 30;
        int n = 8;
        double[] v = new double[dates * n];
        for (int p = 0; p < v.length; p++) v[p] = rnd.nextDouble() < 0.05 ? Double.NaN : 0.01 * rnd.nextGaussian();
        double[] w = FactorFitter.weights(dates, 10.0);
        LedoitWolf lw = WindowCovariance.of(v, dates, n, w, null).ledoitWolf();

        double[] mu = new double[n];
        double[] seen = new double[n];
        for (int t = 0; t < dates; t++) for (int i = 0; i < n; i++) if (!Double.isNaN(v[t * n + i])) {
            mu[i] += w[t] * v[t * n + i];
            seen[i] += w[t];
        }
        for (int i = 0; i < n; i++) mu[i] /= seen[i];
        double[][] x = new double[dates][n];
        for (int t = 0; t < dates; t++) for (int i = 0; i < n; i++) x[t][i] = Double.isNaN(v[t * n + i]) ? 0 : v[t * n + i] - mu[i];
        double[][] s = new double[n][n];
        for (int t = 0; t < dates; t++) for (int i = 0; i < n; i++) for (int j = 0; j < n; j++) s[i][j] += w[t] * x[t][i] * x[t][j];
        double m = 0;
        for (int i = 0; i < n; i++) m += s[i][i] / n;
        double d2 = 0;
        for (int i = 0; i < n; i++) for (int j = 0; j < n; j++) d2 += Math.pow(s[i][j] - (i == j ? m : 0), 2) / n;
        double b2 = 0;
        for (int t = 0; t < dates; t++) for (int i = 0; i < n; i++) for (int j = 0; j < n; j++) {
            b2 += w[t] * w[t] * Math.pow(x[t][i] * x[t][j] - s[i][j], 2) / n;
        }
        assertEquals(m, lw.m(), 1e-12 * m);
        assertEquals(d2, lw.d2(), 1e-10 * d2);
        assertEquals(b2, lw.b2Bar(), 1e-10 * b2);
        assertEquals(Math.min(b2, d2) / d2, lw.shrinkage(), 1e-10);
        assertTrue(lw.shrinkage() > 0 && lw.shrinkage() < 1, "a 30 x 8 window shrinks part of the way: " + lw.shrinkage());
    }

    @Test
    void woodbury_route_equals_an_lu_inverse_of_the_explicit_matrix() {
        // n = 20 > T = 15: the inverse goes through Woodbury's identity; commons-math3's LU decomposition of the
        // explicit 20 x 20 matrix (built from entries) is the outside route to the same numbers.
        Random rnd = new Random(11);
        int dates = 15;
        int n = 20;
        double[] v = new double[dates * n];
        for (int p = 0; p < v.length; p++) v[p] = 0.01 * rnd.nextGaussian();
        LedoitWolf lw = WindowCovariance.of(v, dates, n, EvaluationCheckValuesTest.equal(dates), null).ledoitWolf();
        double[][] full = new double[n][n];
        for (int i = 0; i < n; i++) for (int j = 0; j < n; j++) full[i][j] = lw.entry(i, j);
        var lu = new org.apache.commons.math3.linear.LUDecomposition(new org.apache.commons.math3.linear.Array2DRowRealMatrix(full));
        double[] x = probe(n);
        double q = new org.apache.commons.math3.linear.ArrayRealVector(x).dotProduct(lu.getSolver().solve(new org.apache.commons.math3.linear.ArrayRealVector(x)));
        CovarianceInverse inv = lw.inverse();
        assertEquals(Math.log(lu.getDeterminant()), inv.logDeterminant(), 1e-9 * Math.abs(inv.logDeterminant()), "ln|Sigma| (commons-math3 LU)");
        assertEquals(q, inv.quadraticForm(x), 1e-9 * q, "x' Sigma^-1 x (commons-math3 LU)");
    }
}
