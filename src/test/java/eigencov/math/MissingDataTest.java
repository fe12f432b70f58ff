package eigencov.math;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Random;
import org.junit.jupiter.api.Test;

/** EM-PCA imputation (methods.md section 7) on a planted panel with gaps. */
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
        // and EM beats filling the gaps with zeros, which design.md forbids because it biases variance down
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
