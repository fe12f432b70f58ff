package eigencov.math;

import org.apache.commons.math3.stat.regression.OLSMultipleLinearRegression;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Random;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * Short-history names (docs/design.md section 6; docs/methods.md section 7, project-in) on seeded
 * planted panels: r_ti = sum_j L_ij g_tj + e_ti with three factors of daily sd 1 %, 0.8 %, 0.6 %
 * and specific sd between 0.5 % and 0.8 %.
 */
class ShortHistoryFitTest {
    private static final int T = 252;
    private static final int K = 120;
    private static final int R = 3;
    private static final double[] FACTOR_SD = {0.010, 0.008, 0.006};
    /** Algebraic identities after an eigen-decomposition: rounding only (DEVELOPERS.md tolerance table). */
    private static final double IDENTITY = 1e-9;
    /** Standard errors allowed for a sampling difference (a normal deviate beyond 4 sd: about 6e-5). */
    private static final double SAMPLING_SDS = 4;

    /** The planted panel; columns whose index is in {@code cutTo} keep only their last cutTo[1] dates. */
    static ReturnPanel planted(long seed, int[]... cuts) {
        Random rnd = new Random(seed);
        double[] l = new double[K * R];
        double[] sd = new double[K];
        for (int i = 0; i < K; i++) {
            l[i * R] = 0.7 + 0.6 * rnd.nextDouble();
            for (int j = 1; j < R; j++) l[i * R + j] = rnd.nextGaussian();
            sd[i] = 0.005 + 0.003 * rnd.nextDouble();
        }
        double[] v = new double[T * K];
        for (int t = 0; t < T; t++) {
            double[] g = new double[R];
            for (int j = 0; j < R; j++) g[j] = FACTOR_SD[j] * rnd.nextGaussian();
            for (int i = 0; i < K; i++) {
                double s = 0;
                for (int j = 0; j < R; j++) s += l[i * R + j] * g[j];
                v[t * K + i] = s + sd[i] * rnd.nextGaussian();
            }
        }
        for (int[] cut : cuts) {
            for (int t = 0; t < T - cut[1]; t++) v[t * K + cut[0]] = Double.NaN;
        }
        return new ReturnPanel(Fixtures.days(T), Fixtures.names(K), v);
    }

    static FitOptions options(Integer minObservations) {
        return new FitOptions(new FactorRule.Fixed(R), null, 0.9, Basis.COVARIANCE, FitOptions.DEFAULT_SPECIFIC_FLOOR,
                FactorHold.NONE, false, minObservations);
    }

    @Test
    void a_name_cut_to_120_of_252_days_gets_exposures_and_specific_variance_within_sampling_error_of_its_full_history() {
        int cut = 7;
        FitResult full = new FactorFitter(null).fit(planted(1L), options(null), null);
        FitResult shortened = new FactorFitter(null).fit(planted(1L, new int[] {cut, 120}), options(60), null);
        String name = Fixtures.names(K).get(cut);

        assertEquals(-1, shortened.model().indexOf(name), "below 90 % coverage: not in the universe");
        assertEquals(List.of(name), shortened.shortHistory().tickers());
        assertEquals(120, shortened.shortHistory().observations()[0]);
        assertTrue(shortened.excluded().stream().noneMatch(e -> e.ticker().equals(name)), "served, so no longer excluded");
        FactorModel served = shortened.servedModel();
        int row = served.indexOf(name);
        assertEquals(K - 1, row, "short-history rows follow the universe's");

        // Tolerance: the standard error of a regression coefficient, sigma_e / (sqrt(n) sigma_f_j)
        // (e.g. Greene, Econometric Analysis, the OLS slope variance sigma^2 (X'X)^-1; from memory),
        // with n = 120 dates, sigma_e the name's specific sd and sigma_f_j = sqrt(lambda_j).
        int i = full.model().indexOf(name);
        double sigmaE = Math.sqrt(full.model().specificVariance(i));
        int checked = 0;
        for (int j = 0; j < R; j++) {
            double se = sigmaE / (Math.sqrt(120) * Math.sqrt(full.eigenvalues()[j]));
            assertEquals(full.model().exposure(i, j), served.exposure(row, j), SAMPLING_SDS * se, "exposure " + j);
            checked++;
        }
        assertEquals(R, checked);
        // and the tolerance discriminates: nearly every other universe name's exposures fall outside it
        int inside = 0;
        for (int other = 0; other < full.model().size(); other++) {
            boolean within = other != i;
            for (int j = 0; j < R && within; j++) {
                double se = sigmaE / (Math.sqrt(120) * Math.sqrt(full.eigenvalues()[j]));
                within = Math.abs(full.model().exposure(other, j) - served.exposure(row, j)) <= SAMPLING_SDS * se;
            }
            if (within) inside++;
        }
        assertTrue(inside <= full.model().size() / 20, inside + " other names are within the tolerance too");
        // A variance estimated from n residuals has relative sd sqrt(2 / n) (chi-square with n - k - 1 degrees of
        // freedom, normal returns; from memory), and the weighted mean square is biased down by (k + 1) / n.
        double d = full.model().specificVariance(i);
        double rel = SAMPLING_SDS * Math.sqrt(2.0 / 120) + (R + 1) / 120.0;
        assertEquals(d, served.specificVariance(row), rel * d, "specific variance");
    }

    @Test
    void exposures_and_specific_variance_equal_a_textbook_least_squares_fit_by_commons_math() {
        // half-life weights: weighted least squares as OLS of sqrt(w) x on [sqrt(w), sqrt(w) f] without intercept
        int cut = 11;
        FitOptions o = new FitOptions(new FactorRule.Fixed(R), 63.0, 0.9, Basis.COVARIANCE, 0.0, FactorHold.NONE, false, 60);
        ReturnPanel panel = planted(2L, new int[] {cut, 90});
        FitResult fit = new FactorFitter(null).fit(panel, o, null);
        double[] w = FactorFitter.weights(T, 63.0);
        double[] f = fit.factorReturns();
        int n = 90;
        double[] y = new double[n];
        double[][] x = new double[n][R + 1];
        double sw = 0;
        for (int a = 0; a < n; a++) {
            int t = T - n + a;
            double s = Math.sqrt(w[t]);
            sw += w[t];
            y[a] = s * panel.value(t, cut);
            x[a][0] = s;
            for (int j = 0; j < R; j++) x[a][j + 1] = s * f[t * R + j];
        }
        OLSMultipleLinearRegression ols = new OLSMultipleLinearRegression(); // commons-math3, test-scope oracle
        ols.setNoIntercept(true);
        ols.newSampleData(y, x);
        double[] beta = ols.estimateRegressionParameters();
        double rss = 0;
        for (double e : ols.estimateResiduals()) rss += e * e;

        FactorModel served = fit.servedModel();
        int row = served.indexOf(Fixtures.names(K).get(cut));
        double scale = Arrays.stream(beta).map(Math::abs).max().orElseThrow();
        for (int j = 0; j < R; j++) assertEquals(beta[j + 1], served.exposure(row, j), IDENTITY * scale, "exposure " + j);
        assertEquals(rss / sw, served.specificVariance(row), IDENTITY * rss / sw, "weighted mean squared residual");
    }

    @ParameterizedTest(name = "{0} basis, half-life {1}")
    @CsvSource({"COVARIANCE, 0", "CORRELATION, 0", "COVARIANCE, 60", "CORRELATION, 60"})
    void a_universe_name_projected_in_gets_back_its_own_exposures_and_specific_variance(Basis basis, double halfLife) {
        // Algebraic identity: the factor returns' weighted covariance is F and their weighted cross-covariance with a
        // universe name is (B F)_i (docs/design.md section 3), so the regression on them returns B_i and the residual
        // variance S_ii - B_i F B_i' = d_i (floor 0). The copy of a universe name, offered as a coverage exclusion,
        // must therefore get that name's row.
        Double h = halfLife == 0 ? null : halfLife;
        FitOptions o = new FitOptions(new FactorRule.Fixed(R), h, 0.9, basis, 0.0, FactorHold.NONE, false, 60);
        ReturnPanel panel = planted(3L);
        FitResult fit = new FactorFitter(null).fit(panel, o, null);
        int src = 4;
        List<String> tickers = new ArrayList<>(panel.tickers());
        tickers.add("COPY");
        double[] v = new double[T * (K + 1)];
        for (int t = 0; t < T; t++) {
            for (int i = 0; i < K; i++) v[t * (K + 1) + i] = panel.value(t, i);
            v[t * (K + 1) + K] = panel.value(t, src);
        }
        ReturnPanel withCopy = new ReturnPanel(panel.dates(), tickers, v);
        List<Exclusion> excluded = List.of(new Exclusion("COPY", T, T, Exclusion.COVERAGE));
        FitResult extended = ShortHistoryFit.extend(fit.withShortHistory(ShortHistory.NONE, excluded, 0), withCopy, o);
        FactorModel served = extended.servedModel();
        int i = fit.model().indexOf(panel.tickers().get(src));
        int row = served.indexOf("COPY");
        for (int j = 0; j < R; j++) {
            assertEquals(fit.model().exposure(i, j), served.exposure(row, j), IDENTITY * Math.abs(fit.model().exposure(i, 0)), "B " + j);
        }
        assertEquals(fit.model().specificVariance(i), served.specificVariance(row), IDENTITY * fit.variances()[i], "d");
    }

    @Test
    void the_universe_fit_and_its_EM_imputation_are_the_same_with_and_without_the_option() {
        // gaps in admitted names (EM runs) and two below the coverage threshold
        ReturnPanel panel = planted(4L, new int[] {2, 240}, new int[] {9, 235}, new int[] {20, 100}, new int[] {30, 59});
        FitResult without = new FactorFitter(null).fit(panel, options(null), null);
        FitResult with = new FactorFitter(null).fit(panel, options(60), null);
        assertTrue(with.imputation().cells() > 0, "EM had gaps to fill");
        assertEquals(without.model(), with.model(), "the universe's model, bit for bit");
        assertArrayEquals(without.factorReturns(), with.factorReturns(), 0);
        assertArrayEquals(without.eigenvalues(), with.eigenvalues(), 0);
        assertArrayEquals(without.variances(), with.variances(), 0);
        assertEquals(without.imputation(), with.imputation());
        assertEquals(0, without.shortHistory().size());
        assertEquals(List.of(Fixtures.names(K).get(20)), with.shortHistory().tickers(), "100 observations: served");
        // 59 observations, below the minimum of 60: excluded for coverage, as without the option
        Exclusion below = with.excluded().stream().filter(e -> e.ticker().equals(Fixtures.names(K).get(30))).findFirst().orElseThrow();
        assertEquals(Exclusion.COVERAGE, below.reason());
        assertEquals(59, below.observations());
    }

    @Test
    void a_refit_aligned_to_the_previous_universe_model_keeps_the_model_and_the_short_history_names() {
        ReturnPanel panel = planted(5L, new int[] {3, 100});
        FitResult first = new FactorFitter(null).fit(panel, options(60), null);
        FitResult again = new FactorFitter(null).fit(panel, options(60), first.model());
        assertEquals(first.model(), again.model(), "same window, previous fit's universe: nothing flips");
        assertEquals(first.shortHistory().tickers(), again.shortHistory().tickers());
        assertArrayEquals(first.shortHistory().exposures(), again.shortHistory().exposures(), 0);
    }

    @Test
    void a_minimum_below_k_plus_2_or_above_the_window_is_refused_at_fit_time() {
        ReturnPanel panel = planted(6L);
        FitOptions shareRule = new FitOptions(new FactorRule.VarianceShare(0.99), null, 0.9, Basis.COVARIANCE, 0.05,
                FactorHold.NONE, false, 4);
        IllegalArgumentException low = assertThrows(IllegalArgumentException.class,
                () -> new FactorFitter(null).fit(panel, shareRule, null));
        assertTrue(low.getMessage().contains("shortHistory.minObservations 4 is below k + 2"), low.getMessage());
        IllegalArgumentException high = assertThrows(IllegalArgumentException.class,
                () -> new FactorFitter(null).fit(panel, options(T + 1), null));
        assertTrue(high.getMessage().contains("above the window's " + T + " dates"), high.getMessage());
        assertThrows(IllegalArgumentException.class, () -> options(2));
    }

    @Test
    void a_short_history_name_constant_over_its_dates_is_excluded_for_zero_variance() {
        ReturnPanel panel = planted(7L, new int[] {5, 80});
        double[] v = panel.values();
        for (int t = T - 80; t < T; t++) v[t * K + 5] = 0.001;
        FitResult fit = new FactorFitter(null).fit(new ReturnPanel(panel.dates(), panel.tickers(), v), options(60), null);
        assertFalse(fit.shortHistory().tickers().contains(Fixtures.names(K).get(5)));
        Exclusion e = fit.excluded().stream().filter(x -> x.ticker().equals(Fixtures.names(K).get(5))).findFirst().orElseThrow();
        assertEquals(Exclusion.ZERO_VARIANCE, e.reason());
    }
}
