package eigencov.math;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;

import java.time.LocalDate;
import java.util.List;
import org.apache.commons.math3.distribution.MultivariateNormalDistribution;
import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.LUDecomposition;
import org.apache.commons.math3.linear.RealMatrix;
import org.apache.commons.math3.stat.descriptive.DescriptiveStatistics;
import org.junit.jupiter.api.Test;

/**
 * The evaluation statistics against the check values of docs/methods.md sections 5 and 10 (computed
 * there with numpy, printed with 6 or 4 decimals) and against commons-math3 as an outside oracle.
 */
class EvaluationCheckValuesTest {
    /** Half a unit in the 4th decimal: the bands are printed with 4. */
    private static final double FOUR_DECIMALS = 5.01e-5;
    /** Rounding only (sums of a few dozen terms). */
    private static final double ROUNDING = 1e-12;

    @Test
    void band_for_52_and_252_outcomes_is_the_published_approximate_band() {
        // docs/methods.md section 10, check: T = 52 => approx [0.8039, 1.1961]; T = 252 => [0.9109, 1.0891]
        assertArrayEquals(new double[] {0.8039, 1.1961}, BiasStatistics.band(52), FOUR_DECIMALS);
        assertArrayEquals(new double[] {0.9109, 1.0891}, BiasStatistics.band(252), FOUR_DECIMALS);
        assertThrows(IllegalArgumentException.class, () -> BiasStatistics.band(0));
    }

    @Test
    void qlike_term_has_the_published_values() {
        // docs/methods.md section 10, check: q(z^2): 0.5 -> 1.193147, 1 -> 1.0, 2 -> 1.306853, 4 -> 2.613706
        MethodsCheckValuesTest.close(1.193147, BiasStatistics.qlike(0.5), "q(0.5)");
        MethodsCheckValuesTest.close(1.0, BiasStatistics.qlike(1), "q(1)");
        MethodsCheckValuesTest.close(1.306853, BiasStatistics.qlike(2), "q(2)");
        MethodsCheckValuesTest.close(2.613706, BiasStatistics.qlike(4), "q(4)");
        assertThrows(IllegalArgumentException.class, () -> BiasStatistics.qlike(0));
    }

    @Test
    void ledoit_wolf_on_dataset_a_has_the_published_intensity_and_matrix() {
        // docs/methods.md section 5, check: LW on Dataset A (n = 6): m = 0.325833, d^2 = 0.216758, bbar^2 = 0.048389,
        // alpha = 0.223240; diagonal (0.536206, 0.316124, 0.204788, 0.246215), Sigma[1,2] = 0.317177
        LedoitWolf lw = WindowCovariance.of(MethodsCheckValuesTest.DATASET_A, 6, 4, equal(6), null).ledoitWolf();
        MethodsCheckValuesTest.close(0.325833, lw.m(), "m");
        MethodsCheckValuesTest.close(0.216758, lw.d2(), "d^2");
        MethodsCheckValuesTest.close(0.048389, lw.b2Bar(), "bbar^2");
        MethodsCheckValuesTest.close(0.223240, lw.shrinkage(), "alpha");
        double[] diag = {0.536206, 0.316124, 0.204788, 0.246215};
        for (int i = 0; i < 4; i++) {
            MethodsCheckValuesTest.close(diag[i], lw.entry(i, i), "Sigma_LW[" + i + "," + i + "]");
            MethodsCheckValuesTest.close(diag[i], lw.variance(i), "variance(" + i + ")");
        }
        MethodsCheckValuesTest.close(0.317177, lw.entry(0, 1), "Sigma_LW[1,2]");
    }

    @Test
    void factor_forecast_log_determinant_of_toy_model_m_is_the_published_value() {
        // docs/methods.md section 10, check: Toy M: ln|Sigma| = -8.684318 both directly and via the determinant lemma
        FactorModel m = new FactorModel(List.of("A", "B", "C"), 2, new double[] {1.0, 0.5, 0.8, -0.3, 1.2, 0.1},
                new double[] {0.04, 0, 0, 0.01}, new double[] {0.02, 0.03, 0.05});
        FactorForecast f = new FactorForecast(m, new int[] {0, 1, 2});
        MethodsCheckValuesTest.close(-8.684318, f.inverse().logDeterminant(), "ln|Sigma|");
        // Toy M's Sigma: [[.0625,.0305,.0485],[.0305,.0565,.0381],[.0485,.0381,.1077]] (docs/methods.md section 0)
        MethodsCheckValuesTest.close(0.0565, f.variance(1), "Sigma_22");
        double[] w = {0.5, 0.3, 0.2};
        double direct = 0.25 * 0.0625 + 0.09 * 0.0565 + 0.04 * 0.1077 + 2 * (0.15 * 0.0305 + 0.1 * 0.0485 + 0.06 * 0.0381);
        assertEquals(direct, f.variance(w), ROUNDING);
        assertEquals(direct, f.variance(new int[] {0, 1, 2}, w), ROUNDING);
    }

    @Test
    void scores_of_a_small_example_equal_a_direct_computation_with_commons_math() {
        // Toy model M as the forecast at two dates, horizon 2; the log-likelihood against commons-math3's
        // MultivariateNormalDistribution (an outside implementation of the Gaussian density) of h C.
        FactorModel m = new FactorModel(List.of("A", "B", "C"), 2, new double[] {1.0, 0.5, 0.8, -0.3, 1.2, 0.1},
                new double[] {0.04, 0, 0, 0.01}, new double[] {0.02, 0.03, 0.05});
        double[][] sigma = {{.0625, .0305, .0485}, {.0305, .0565, .0381}, {.0485, .0381, .1077}};
        double[][] r = {{0.1, -0.05, 0.2}, {-0.3, 0.1, 0.05}, {0.02, 0.4, -0.1}};
        ForecastScores s = new ForecastScores(2, 3, 0);
        for (int t = 0; t < 3; t++) s.add(LocalDate.of(2025, 1, 6 + t), new FactorForecast(m, new int[] {0, 1, 2}), r[t], new int[] {0, 1, 2}, null, null);
        ForecastScores.Scores out = s.result();

        RealMatrix hc = new Array2DRowRealMatrix(sigma).scalarMultiply(2);
        MultivariateNormalDistribution normal = new MultivariateNormalDistribution(new double[3], hc.getData());
        double ll = 0;
        DescriptiveStatistics zEqual = new DescriptiveStatistics();
        DescriptiveStatistics mvReturns = new DescriptiveStatistics();
        RealMatrix inv = new LUDecomposition(hc.scalarMultiply(0.5)).getSolver().getInverse();
        double[] ones = {1, 1, 1};
        double[] v = inv.operate(ones);
        double total = v[0] + v[1] + v[2];
        double[] mv = {v[0] / total, v[1] / total, v[2] / total};
        for (double[] rt : r) {
            ll += Math.log(normal.density(rt));
            double eq = (rt[0] + rt[1] + rt[2]) / 3;
            double varEq = 0;
            for (double[] row : sigma) for (double x : row) varEq += x / 9;
            zEqual.addValue(eq / Math.sqrt(2 * varEq));
            mvReturns.addValue(mv[0] * rt[0] + mv[1] * rt[1] + mv[2] * rt[2]);
        }
        assertEquals(ll / 3, out.logLikelihood(), 1e-12);
        assertEquals(zEqual.getStandardDeviation(), out.equal().bias(), ROUNDING);
        assertEquals(3, out.equal().n());
        assertEquals(mvReturns.getStandardDeviation() * Math.sqrt(252 / 2.0), out.minimumVariance().realisedVolatility(), 1e-12);
        assertEquals(0.0, out.minimumVariance().turnover(), ROUNDING, "the same forecast every date: no turnover");
        assertEquals(Math.sqrt(2 / total), out.series().get(0).minimumVarianceVolatility(), ROUNDING);
        assertNull(out.random());
    }

    @Test
    void turnover_counts_names_that_leave_and_enter() {
        // weights move from {A: 0.5, B: 0.5} to {B: 0.5, C: 0.5}: |0-0.5| + |0.5-0.5| + |0.5-0| = 1
        FactorModel m = new FactorModel(List.of("A", "B", "C"), 1, new double[] {0, 0, 0}, new double[] {0.01},
                new double[] {0.04, 0.04, 0.04});
        ForecastScores s = new ForecastScores(1, 3, 0);
        s.add(LocalDate.of(2025, 1, 6), new FactorForecast(m, new int[] {0, 1}), new double[] {0.01, 0.02}, new int[] {0, 1}, null, null);
        s.add(LocalDate.of(2025, 1, 7), new FactorForecast(m, new int[] {1, 2}), new double[] {0.01, 0.02}, new int[] {1, 2}, null, null);
        assertEquals(1.0, s.result().minimumVariance().turnover(), ROUNDING);
    }

    static double[] equal(int n) {
        double[] w = new double[n];
        java.util.Arrays.fill(w, 1.0 / n);
        return w;
    }
}
