package eigencov.math;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Random;
import org.junit.jupiter.api.Test;

/** EM-PCA imputation (docs/methods.md section 7) on a planted panel with gaps. */
class MissingDataTest {

    static final int T = 250;
    static final int K = 80;

    /** Planted 3-factor panel in return units (factor vol 1 %, noise 1 %), values T x K. */
    static double[] panel() {
        double[][] p = Fixtures.planted(T, K, 3, 1.0, 77);
        double[] v = p[0];
        for (int x = 0; x < v.length; x++) {
            v[x] *= 0.01;
        }
        return v;
    }

    static double relativeFrobenius(double[] a, double[] b) {
        double num = 0;
        double den = 0;
        for (int x = 0; x < a.length; x++) {
            num += (a[x] - b[x]) * (a[x] - b[x]);
            den += b[x] * b[x];
        }
        return Math.sqrt(num / den);
    }

    @Test
    void ten_percent_missing_at_random_gives_a_fit_close_to_the_complete_data_fit() {
        double[] full = panel();
        double[] gappy = full.clone();
        Random r = new Random(5);
        int removed = 0;
        for (int x = 0; x < gappy.length; x++) {
            if (r.nextDouble() < 0.10) {
                gappy[x] = Double.NaN;
                removed++;
            }
        }
        FitOptions o = FitOptions.of(new FactorRule.Fixed(3), 0.8);
        FactorFitter fitter = new FactorFitter(null);
        FitResult complete = fitter.fit(Fixtures.panel(T, K, full), o, null);
        FitResult imputed = fitter.fit(Fixtures.panel(T, K, gappy), o, null);
        assertEquals(removed, imputed.imputation().cells());
        assertTrue(imputed.imputation().converged(), imputed.imputation().toString());
        assertTrue(imputed.imputation().iterations() > 1);
        assertEquals(K, imputed.model().size(), "every ticker keeps >= 80 % coverage");
        // measures: largest principal angle between the exposure spaces below 3 degrees, model covariance within
        // 5 % (relative Frobenius) and top eigenvalues within 5 % of the complete-data fit
        double angle = Fixtures.largestPrincipalAngleDegrees(imputed.model().exposures(), K, 3,
                complete.model().exposures(), 3);
        assertTrue(angle < 3, "largest principal angle " + angle);
        double cov = relativeFrobenius(Fixtures.modelCovariance(imputed.model()),
                Fixtures.modelCovariance(complete.model()));
        assertTrue(cov < 0.05, "model covariance relative Frobenius difference " + cov);
        for (int j = 0; j < 3; j++) {
            double a = imputed.eigenvalues()[j];
            double b = complete.eigenvalues()[j];
            assertTrue(Math.abs(a - b) < 0.05 * b, "eigenvalue " + j + ": " + a + " vs " + b);
        }
        // and EM beats filling the gaps with zeros, which docs/design.md section 3 forbids because it biases variance down
        double[] zeros = gappy.clone();
        for (int x = 0; x < zeros.length; x++) {
            if (Double.isNaN(zeros[x])) {
                zeros[x] = 0;
            }
        }
        FitResult zeroFilled = fitter.fit(Fixtures.panel(T, K, zeros), o, null);
        double zeroCov = relativeFrobenius(Fixtures.modelCovariance(zeroFilled.model()),
                Fixtures.modelCovariance(complete.model()));
        assertTrue(cov < zeroCov, "EM " + cov + " vs zero fill " + zeroCov);
    }

    /**
     * Halts (runs of missing days), late listings and early delistings in a half-life weighted window, fitted
     * with more factors than the panel carries (6 against 3 planted), as the demo's 15-factor model does on a
     * 13-factor market: factors 4-6 sit in the noise spectrum with no eigengap below them, which is where a
     * k-vector subspace tracker inside EM stalls. EM must still stop within the iteration budget at the
     * fixed point it reports, and close to the complete-data fit.
     */
    @Test
    void halts_with_surplus_factors_converge_quickly_to_the_em_fixed_point_close_to_the_complete_data_fit() {
        int t = 300;
        int k = 120;
        double[] full = Fixtures.planted(t, k, 3, 1.0, 91)[0];
        for (int x = 0; x < full.length; x++) {
            full[x] *= 0.01;
        }
        double[] gappy = full.clone();
        Random r = new Random(17);
        for (int h = 0; h < 25; h++) { // halts of 5 to 20 trading days, one per halted ticker
            int i = 4 * h;
            int len = 5 + r.nextInt(16);
            int from = r.nextInt(t - len);
            for (int d = from; d < from + len; d++) {
                gappy[d * k + i] = Double.NaN;
            }
        }
        for (int i = 0; i < 4; i++) { // listed after the window start, delisted before its end
            for (int d = 0; d < 18; d++) {
                gappy[d * k + 100 + i] = Double.NaN;
                gappy[(t - 1 - d) * k + 110 + i] = Double.NaN;
            }
        }
        FitOptions o = new FitOptions(new FactorRule.Fixed(6), 60.0, 0.9, Basis.COVARIANCE,
                FitOptions.DEFAULT_SPECIFIC_FLOOR);
        FitResult complete = new FactorFitter(null).fit(Fixtures.panel(t, k, full), o, null);
        FitResult imputed = new FactorFitter(null).fit(Fixtures.panel(t, k, gappy), o, null);
        FitResult tight = new FactorFitter(null, 1e-11, 2000).fit(Fixtures.panel(t, k, gappy), o, null);
        ImputationReport em = imputed.imputation();
        assertEquals(k, imputed.model().size(), "every ticker keeps >= 90 % coverage");
        assertTrue(em.converged() && em.iterations() <= 80, em.toString());
        assertTrue(tight.imputation().converged(), tight.imputation().toString());
        // stopping at 1e-6 leaves the model within 5e-4 (relative Frobenius; observed 8e-5) of the tightly converged one:
        // the reported convergence is real, not a stall of the tracker
        double toFixedPoint = relativeFrobenius(Fixtures.modelCovariance(imputed.model()),
                Fixtures.modelCovariance(tight.model()));
        assertTrue(toFixedPoint < 5e-4, "distance to the EM fixed point " + toFixedPoint);
        // same measures as the 10 %-at-random check: planted 3-factor space and model covariance
        double angle = Fixtures.largestPrincipalAngleDegrees(firstColumns(imputed.model(), 3), k, 3,
                firstColumns(complete.model(), 3), 3);
        assertTrue(angle < 3, "largest principal angle " + angle);
        double cov = relativeFrobenius(Fixtures.modelCovariance(imputed.model()),
                Fixtures.modelCovariance(complete.model()));
        assertTrue(cov < 0.05, "model covariance relative Frobenius difference " + cov);
    }

    /** The first c exposure columns (N x c, row-major) of a model. */
    static double[] firstColumns(FactorModel m, int c) {
        double[] b = m.exposures();
        int n = m.size();
        int kk = m.factors();
        double[] out = new double[n * c];
        for (int i = 0; i < n; i++) {
            System.arraycopy(b, i * kk, out, i * c, c);
        }
        return out;
    }

    @Test
    void tickers_below_coverage_are_excluded_with_counts_and_gaps_of_others_are_imputed() {
        double[] v = panel();
        for (int t = 0; t < 100; t++) {
            v[t * K + 7] = Double.NaN; // ticker 7 observed on 150 of 250 dates
        }
        v[3 * K + 9] = Double.NaN;
        FitResult r = new FactorFitter(null).fit(Fixtures.panel(T, K, v),
                FitOptions.of(new FactorRule.Fixed(3), 0.9), null);
        assertEquals(1, r.excluded().size());
        Exclusion e = r.excluded().get(0);
        assertEquals("ZQ7", e.ticker());
        assertEquals(150, e.observations());
        assertEquals(225, e.required());
        assertEquals(Exclusion.COVERAGE, e.reason());
        assertEquals(-1, r.model().indexOf("ZQ7"));
        assertEquals(K - 1, r.model().size());
        assertEquals(1, r.imputation().cells());
    }
}
