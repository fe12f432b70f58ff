package eigencov.math;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.List;
import java.util.Random;
import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.LUDecomposition;
import org.apache.commons.math3.linear.RealMatrix;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;
import org.junit.jupiter.api.Test;

/**
 * Woodbury inverse and determinant lemma of a factor-form covariance, checked against commons-math3's
 * LU decomposition of the explicit matrix (a general-purpose library as outside oracle) and against the
 * Toy model M check values of docs/methods.md sections 9-11 (numbers computed with numpy there).
 */
class FactorInverseTest {

    /** Rounding only: both sides are backward stable on matrices with condition number below 1e4. */
    static final double RELATIVE = 1e-10;
    /** docs/methods.md prints its check values with 6 decimals. */
    static final double SIX_DECIMALS = 5.01e-7;

    /** Toy model M (docs/methods.md section 0): B = [[1,.5],[.8,-.3],[1.2,.1]], F = diag(.04,.01), D = diag(.02,.03,.05). */
    static FactorModel toyM() {
        return new FactorModel(List.of("A", "B", "C"), 2, new double[] {1.0, 0.5, 0.8, -0.3, 1.2, 0.1},
                new double[] {0.04, 0, 0, 0.01}, new double[] {0.02, 0.03, 0.05});
    }

    @Test
    void toy_model_M_log_determinant_and_minimum_variance_match_the_published_check_values() {
        FactorInverse inv = FactorInverse.of(toyM(), new int[] {0, 1, 2});
        // docs/methods.md section 10, Check: ln|Sigma| = -8.684318 (directly and via the determinant lemma)
        assertEquals(-8.684318, inv.logDeterminant(), SIX_DECIMALS);
        // docs/methods.md section 9, Check: w_mv = (0.428215, 0.539820, 0.031966), sigma_mv = 0.211609
        double[] w = new double[3];
        double var = inv.minimumVariance(1.0, w);
        assertArrayEquals(new double[] {0.428215, 0.539820, 0.031966}, w, SIX_DECIMALS);
        assertEquals(0.211609, Math.sqrt(var), SIX_DECIMALS);
    }

    @Test
    void toy_model_M_inverse_equals_the_direct_inverse() {
        // docs/methods.md section 11, Check: Woodbury vs direct inverse, max error 3.6e-15 there
        FactorModel m = toyM();
        double[] c = RiskCalculator.covariance(m, new int[] {0, 1, 2}, 1.0, false);
        double[] direct = luInverse(c, 3);
        double[] woodbury = FactorInverse.of(m, new int[] {0, 1, 2}).inverse(1.0);
        for (int i = 0; i < 9; i++) assertEquals(direct[i], woodbury[i], 1e-12 * maxAbs(direct));
    }

    @ParameterizedTest(name = "{0} names, k = {1}, rotated F = {2}")
    @CsvSource({"5, 2, false", "50, 5, true", "500, 20, false", "200, 12, true"})
    void inverse_solve_quadratic_form_and_determinant_agree_with_an_LU_decomposition(int n, int k, boolean rotated) {
        FactorModel m = randomModel(n + 7, k, 17L * n + k, rotated);
        int[] idx = new int[n];
        for (int a = 0; a < n; a++) idx[a] = n + 6 - a; // a subset in reverse order, not the first rows
        double scale = 252;
        double[] c = RiskCalculator.covariance(m, idx, scale, false);
        RealMatrix cm = new Array2DRowRealMatrix(n, n);
        for (int a = 0; a < n; a++) for (int b = 0; b < n; b++) cm.setEntry(a, b, c[a * n + b]);
        LUDecomposition lu = new LUDecomposition(cm);
        RealMatrix oracle = lu.getSolver().getInverse();

        FactorInverse inv = FactorInverse.of(m, idx);
        double[] ours = inv.inverse(scale);
        double big = 0;
        for (int a = 0; a < n; a++) for (int b = 0; b < n; b++) big = Math.max(big, Math.abs(oracle.getEntry(a, b)));
        for (int a = 0; a < n; a++) {
            for (int b = 0; b < n; b++) {
                assertEquals(oracle.getEntry(a, b), ours[a * n + b], RELATIVE * big, "inverse (" + a + ", " + b + ")");
                assertEquals(ours[a * n + b], ours[b * n + a], 0.0, "exactly symmetric");
            }
        }
        // C C^-1 = I to 1e-9 relative (the acceptance bound)
        for (int a = 0; a < n; a += Math.max(1, n / 25)) {
            for (int b = 0; b < n; b++) {
                double s = 0;
                for (int e = 0; e < n; e++) s += c[a * n + e] * ours[e * n + b];
                assertEquals(a == b ? 1.0 : 0.0, s, 1e-9, "C C^-1 at (" + a + ", " + b + ")");
            }
        }
        // log-determinant of the unscaled C: LU's determinant of scale C, minus n ln(scale)
        double logDetOracle = 0;
        RealMatrix u = lu.getU();
        for (int a = 0; a < n; a++) logDetOracle += Math.log(Math.abs(u.getEntry(a, a)));
        logDetOracle -= n * Math.log(scale);
        assertEquals(logDetOracle, inv.logDeterminant(), 1e-9 * Math.abs(logDetOracle));

        Random rnd = new Random(n);
        double[] x = new double[n];
        for (int a = 0; a < n; a++) x[a] = rnd.nextGaussian();
        double[] y = new double[n];
        inv.solve(x, y);
        double[] yOracle = oracle.operate(x);
        double yBig = 0;
        for (double v : yOracle) yBig = Math.max(yBig, Math.abs(v));
        for (int a = 0; a < n; a++) assertEquals(yOracle[a] * scale, y[a], RELATIVE * yBig * scale);
        double q = 0;
        for (int a = 0; a < n; a++) q += x[a] * yOracle[a] * scale;
        assertEquals(q, inv.quadraticForm(x), RELATIVE * Math.abs(q));
    }

    @Test
    void minimum_variance_weights_sum_to_the_budget_and_have_equal_marginal_variances() {
        FactorModel m = randomModel(300, 8, 99, true);
        int[] idx = new int[300];
        for (int a = 0; a < 300; a++) idx[a] = a;
        double[] w = new double[300];
        double var = FactorInverse.of(m, idx).minimumVariance(2.5, w);
        double sum = 0;
        for (double v : w) sum += v;
        assertEquals(2.5, sum, 1e-12 * 2.5);
        // first-order condition: (C w)_i is the same for every i (= variance / budget)
        double[] c = RiskCalculator.covariance(m, idx, 1.0, false);
        for (int a = 0; a < 300; a++) {
            double cw = 0;
            for (int b = 0; b < 300; b++) cw += c[a * 300 + b] * w[b];
            assertEquals(var / 2.5, cw, 1e-9 * var / 2.5, "marginal variance of name " + a);
        }
    }

    @Test
    void two_assets_match_the_textbook_closed_form() {
        // Two assets with variances s1^2, s2^2 and covariance s12: w1 = (s2^2 - s12) / (s1^2 + s2^2 - 2 s12)
        // (the two-asset minimum-variance portfolio of any portfolio textbook).
        FactorModel m = new FactorModel(List.of("X", "Y"), 1, new double[] {0.9, 0.4}, new double[] {0.04},
                new double[] {0.01, 0.03});
        double v1 = 0.81 * 0.04 + 0.01, v2 = 0.16 * 0.04 + 0.03, c12 = 0.36 * 0.04;
        double w1 = (v2 - c12) / (v1 + v2 - 2 * c12);
        double[] w = new double[2];
        double var = FactorInverse.of(m, new int[] {0, 1}).minimumVariance(1.0, w);
        assertEquals(w1, w[0], 1e-14);
        assertEquals(1 - w1, w[1], 1e-14);
        assertEquals((v1 * v2 - c12 * c12) / (v1 + v2 - 2 * c12), var, 1e-15);
    }

    @Test
    void zero_specific_variance_has_no_inverse_and_names_the_positions() {
        FactorModel m = new FactorModel(List.of("A", "B", "C"), 1, new double[] {1, 0.5, 0.2}, new double[] {0.04},
                new double[] {0.01, 0, 0.02});
        SingularCovarianceException e = assertThrows(SingularCovarianceException.class,
                () -> FactorInverse.of(m, new int[] {2, 1, 0}));
        assertArrayEquals(new int[] {1}, e.positions());
        assertTrue(e.getMessage().contains("zero specific variance"));
    }

    static FactorModel randomModel(int n, int k, long seed, boolean rotated) {
        Random rnd = new Random(seed);
        List<String> t = new ArrayList<>();
        for (int i = 0; i < n; i++) t.add("N" + i);
        double[] b = new double[n * k];
        for (int i = 0; i < b.length; i++) b[i] = rnd.nextGaussian() / Math.sqrt(n);
        double[] f = new double[k * k];
        for (int j = 0; j < k; j++) f[j * k + j] = 0.5 / (j + 1);
        if (rotated) {
            for (int j = 0; j + 1 < k; j++) {
                double off = 0.3 * Math.sqrt(f[j * k + j] * f[(j + 1) * k + j + 1]);
                f[j * k + j + 1] = off;
                f[(j + 1) * k + j] = off;
            }
        }
        double[] d = new double[n];
        for (int i = 0; i < n; i++) d[i] = 1e-4 * (1 + 3 * rnd.nextDouble());
        return new FactorModel(t, k, b, f, d);
    }

    static double[] luInverse(double[] c, int n) {
        RealMatrix cm = new Array2DRowRealMatrix(n, n);
        for (int a = 0; a < n; a++) for (int b = 0; b < n; b++) cm.setEntry(a, b, c[a * n + b]);
        RealMatrix inv = new LUDecomposition(cm).getSolver().getInverse();
        double[] out = new double[n * n];
        for (int a = 0; a < n; a++) for (int b = 0; b < n; b++) out[a * n + b] = inv.getEntry(a, b);
        return out;
    }

    static double maxAbs(double[] x) {
        double m = 0;
        for (double v : x) m = Math.max(m, Math.abs(v));
        return m;
    }
}
