package eigencov.math;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.List;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.stream.Stream;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.Arguments;
import org.junit.jupiter.params.provider.MethodSource;

/** Fitter edge cases, validation and sign conventions. */
class FitterBehaviourTest {

    static Stream<Arguments> insufficient() {
        double[] one = {0.01, 0.02};
        double[] constant = {0.01, 0.01, 0.01, 0.01};
        double[] sparse = {0.01, Double.NaN, Double.NaN, 0.02, Double.NaN, Double.NaN};
        return Stream.of(
                Arguments.of(Fixtures.panel(1, 2, one), "1 date"),
                Arguments.of(Fixtures.panel(3, 0, new double[0]), "no tickers"),
                Arguments.of(Fixtures.panel(4, 1, constant), "constant"),
                Arguments.of(Fixtures.panel(3, 2, sparse), "at least 3 of 3"));
    }

    @ParameterizedTest(name = "{1}")
    @MethodSource("insufficient")
    void windows_that_cannot_be_fitted_raise_insufficient_data_with_the_reason(ReturnPanel p, String expected) {
        InsufficientDataException e = assertThrows(InsufficientDataException.class,
                () -> new FactorFitter(null).fit(p, FitOptions.of(new FactorRule.Fixed(1), 1.0), null));
        assertTrue(e.getMessage().contains(expected), e.getMessage());
    }

    @Test
    void invalid_options_and_panels_are_rejected_with_the_field() {
        assertTrue(assertThrows(IllegalArgumentException.class, () -> new FactorRule.Fixed(0)).getMessage()
                .contains("count"));
        assertTrue(assertThrows(IllegalArgumentException.class, () -> new FactorRule.VarianceShare(1.5))
                .getMessage().contains("share"));
        assertTrue(assertThrows(IllegalArgumentException.class,
                () -> new FitOptions(new FactorRule.RandomMatrix(), -1.0, 0.9, Basis.COVARIANCE, 0.05)).getMessage()
                .contains("halfLifeDays"));
        assertTrue(assertThrows(IllegalArgumentException.class,
                () -> new FitOptions(new FactorRule.RandomMatrix(), null, 0.0, Basis.COVARIANCE, 0.05)).getMessage()
                .contains("minCoverage"));
        IllegalArgumentException inf = assertThrows(IllegalArgumentException.class,
                () -> Fixtures.panel(2, 2, new double[] {0, 1, Double.POSITIVE_INFINITY, 0}));
        assertTrue(inf.getMessage().contains("row 1") && inf.getMessage().contains("ZQ0"), inf.getMessage());
        assertThrows(IllegalArgumentException.class,
                () -> new ReturnPanel(Fixtures.days(1), List.of("A", "A"), new double[2]));
    }

    @Test
    void first_fit_orients_every_factor_to_a_positive_sum_and_a_refit_keeps_signs_of_the_previous_fit() {
        double[][] pl = Fixtures.planted(120, 40, 4, 0.5, 8);
        FitOptions o = FitOptions.of(new FactorRule.Fixed(4), 1.0);
        FactorFitter f = new FactorFitter(null);
        FitResult first = f.fit(Fixtures.panel(120, 40, pl[0]), o, null);
        assertEquals(AlignmentReport.FIRST_FIT, first.alignment().mode());
        for (int c = 0; c < 4; c++) {
            double s = 0;
            for (int i = 0; i < 40; i++) {
                s += first.model().exposure(i, c);
            }
            assertTrue(s > 0, "factor " + c + " sum " + s);
        }
        // previous model with every factor negated: the refit must follow it
        double[] neg = first.model().exposures();
        for (int x = 0; x < neg.length; x++) {
            neg[x] = -neg[x];
        }
        FactorModel prev = new FactorModel(first.model().tickers(), 4, neg, first.model().factorCovariance(),
                first.model().specificVariances());
        FitResult again = f.fit(Fixtures.panel(120, 40, pl[0]), o, prev);
        assertEquals(AlignmentReport.PREVIOUS_FIT, again.alignment().mode());
        assertEquals(40, again.alignment().commonTickers());
        for (int c = 0; c < 4; c++) {
            // relative to the same raw solver output, exactly one of the two fits flipped factor c
            assertTrue(first.alignment().flipped().contains(c) ^ again.alignment().flipped().contains(c), "factor " + c);
        }
        assertArrayEquals(neg, again.model().exposures(), 1e-12);
        for (double c : again.alignment().cosines()) {
            assertEquals(1.0, c, 1e-9);
        }
        assertTrue(again.alignment().weak().isEmpty());
        // the flip is applied to the factor returns too, so their covariance stays diagonal
        double[] fr1 = first.factorReturns();
        double[] fr2 = again.factorReturns();
        for (int x = 0; x < fr1.length; x++) {
            assertEquals(-fr1[x], fr2[x], 1e-12);
        }
    }

    @Test
    void a_pool_gives_the_same_fit_as_the_calling_thread() {
        double[][] pl = Fixtures.planted(90, 300, 3, 0.5, 9);
        FitOptions o = FitOptions.of(new FactorRule.BaiNg(10), 1.0);
        ExecutorService pool = Executors.newFixedThreadPool(2);
        try {
            FitResult a = new FactorFitter(null).fit(Fixtures.panel(90, 300, pl[0]), o, null);
            FitResult b = new FactorFitter(pool).fit(Fixtures.panel(90, 300, pl[0]), o, null);
            assertEquals(a.model().factors(), b.model().factors());
            double[] ea = a.eigenvalues();
            double[] eb = b.eigenvalues();
            for (int j = 0; j < ea.length; j++) {
                assertEquals(ea[j], eb[j], 1e-12 * ea[0]);
            }
            assertArrayEquals(a.model().exposures(), b.model().exposures(), 1e-10);
        } finally {
            pool.shutdownNow();
        }
    }

    @Test
    void half_life_weights_with_gaps_in_the_correlation_basis_keep_factor_returns_uncorrelated() {
        double[][] pl = Fixtures.planted(200, 60, 3, 0.7, 12);
        double[] v = pl[0];
        java.util.Random r = new java.util.Random(13);
        for (int x = 0; x < v.length; x++) {
            if (r.nextDouble() < 0.05) {
                v[x] = Double.NaN;
            }
        }
        FitResult res = new FactorFitter(null).fit(Fixtures.panel(200, 60, v),
                new FitOptions(new FactorRule.EigenvalueRatio(10), 40.0, 0.8, Basis.CORRELATION, 0.05), null);
        assertEquals(3, res.model().factors());
        assertTrue(res.imputation().converged(), res.imputation().toString());
        assertEquals(FactorFitter.effectiveObservations(FactorFitter.weights(200, 40.0)), res.effectiveObservations(),
                1e-12);
        double[] w = FactorFitter.weights(200, 40.0);
        double[] fr = res.factorReturns();
        int k = 3;
        for (int a = 0; a < k; a++) {
            for (int b = 0; b < k; b++) {
                double c = 0;
                for (int t = 0; t < 200; t++) {
                    c += w[t] * fr[t * k + a] * fr[t * k + b];
                }
                // weighted covariance of the factor returns is F = diag(lambda) (docs/design.md section 3)
                assertEquals(res.model().factorCov(a, b), c, 1e-11 * res.eigenvalues()[0], a + "," + b);
            }
        }
    }

    @Test
    void correlation_basis_excludes_constant_series_and_scales_exposures_by_sigma() {
        double[][] pl = Fixtures.planted(60, 10, 2, 0.5, 10);
        double[] v = pl[0];
        for (int t = 0; t < 60; t++) {
            v[t * 10 + 4] = 0.003;
        }
        FitResult r = new FactorFitter(null).fit(Fixtures.panel(60, 10, v),
                new FitOptions(new FactorRule.Fixed(2), null, 1.0, Basis.CORRELATION, 0.0), null);
        assertEquals(1, r.excluded().size());
        assertEquals(Exclusion.ZERO_VARIANCE, r.excluded().get(0).reason());
        assertEquals(9, r.model().size());
        assertEquals(9.0, r.totalVariance(), 1e-12, "trace of a correlation matrix is K");
        double[] c = Fixtures.modelCovariance(r.model());
        // diagonal equals the sample variance (floor 0): sigma_i^2 (sum_j e_ij^2 lambda_j + d_i / sigma_i^2)
        for (int i = 0; i < 9; i++) {
            int col = i < 4 ? i : i + 1;
            double mu = 0;
            for (int t = 0; t < 60; t++) {
                mu += v[t * 10 + col] / 60;
            }
            double s = 0;
            for (int t = 0; t < 60; t++) {
                s += (v[t * 10 + col] - mu) * (v[t * 10 + col] - mu) / 60;
            }
            assertEquals(s, c[i * 9 + i], 1e-12 * s, "variance " + i);
        }
    }
}
