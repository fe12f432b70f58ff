package eigencov.math;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.List;
import java.util.Random;
import org.junit.jupiter.api.Test;

/**
 * Check values published in docs/methods.md (computed there with numpy/scipy). They are
 * printed with 6 decimals, hence {@link #SIX_DECIMALS} (absolute). docs/methods.md uses divisor T-1; our
 * equal-weight divisor is T, so its eigenvalues and specific variances scale by (T-1)/T.
 */
class MethodsCheckValuesTest {

    /** Half a unit in the 6th decimal, the precision docs/methods.md prints (plus rounding slack). */
    static final double SIX_DECIMALS = 5.01e-7;
    static final double IDENTITY = 1e-12;

    /** docs/methods.md section 0, Dataset A (T=6, K=4, columns have mean 0). */
    static final double[] DATASET_A = {
        1.0, 0.5, -0.2, 0.3,
        -0.5, -0.4, 0.1, -0.2,
        0.8, 0.9, 0.4, 0.6,
        -1.2, -0.7, -0.3, -0.9,
        0.3, 0.1, 0.6, 0.2,
        -0.4, -0.4, -0.6, 0.0};

    static void close(double expected, double actual, String what) {
        assertEquals(expected, actual, SIX_DECIMALS, what);
    }

    static FitResult fitA(int k, double floor) {
        return new FactorFitter(null).fit(Fixtures.panel(6, 4, DATASET_A),
                new FitOptions(new FactorRule.Fixed(k), null, 1.0, Basis.COVARIANCE, floor), null);
    }

    @Test
    void dataset_A_eigenvalues_first_vector_and_specific_variances() {
        double toN = 5.0 / 6.0;
        FitResult r = fitA(2, 0.0);
        double[] ev = {1.354576, 0.153494, 0.032837, 0.023094}; // docs/methods.md section 1, divisor 5
        for (int j = 0; j < 4; j++) {
            close(ev[j] * toN, r.eigenvalues()[j], "eigenvalue " + j);
        }
        double[] v1 = {0.716941, 0.513016, 0.211378, 0.422053}; // sign: positive sum, as our first-fit rule
        for (int i = 0; i < 4; i++) {
            close(v1[i], r.model().exposure(i, 0), "v1 " + i);
        }
        double[] d2 = {0.009977, 0.019465, 0.000571, 0.025918}; // docs/methods.md section 4, k=2
        for (int i = 0; i < 4; i++) {
            close(d2[i] * toN, r.model().specificVariance(i), "delta k=2 " + i);
        }
        double[] d1 = {0.019741, 0.019495, 0.143477, 0.026711}; // k=1
        FitResult r1 = fitA(1, 0.0);
        for (int i = 0; i < 4; i++) {
            close(d1[i] * toN, r1.model().specificVariance(i), "delta k=1 " + i);
        }
        // model diagonal equals diag(S) exactly when no floor binds; S (divisor 5) from docs/methods.md section 0
        double[] s = {0.716, 0.376, 0.204, 0.268};
        double[] c = Fixtures.modelCovariance(r.model());
        for (int i = 0; i < 4; i++) {
            assertEquals(s[i] * toN, c[i * 4 + i], IDENTITY, "diag " + i);
        }
    }

    @Test
    void dataset_A_floor_binds_where_the_residual_is_below_five_percent() {
        // k=1: delta = (0.019741, 0.019495, 0.143477, 0.026711) against 0.05 S_ii = (0.0358, 0.0188, 0.0102, 0.0134)
        FitResult r = fitA(1, 0.05);
        double toN = 5.0 / 6.0;
        assertEquals(0.05 * 0.716 * toN, r.model().specificVariance(0), IDENTITY, "floor binds");
        close(0.019495 * toN, r.model().specificVariance(1), "unfloored delta_2");
        close(0.143477 * toN, r.model().specificVariance(2), "unfloored delta_3");
        close(0.026711 * toN, r.model().specificVariance(3), "unfloored delta_4");
    }

    @Test
    void dataset_A_beta_of_equal_weights_to_the_first_factor_follows_the_k1_check_value() {
        // docs/methods.md section 9 (Dataset A, equal weights, k = 1 model): w'C v_1 / lambda_1 = 0.477983. Our beta
        // (docs/design.md section 6) scales v_1 to sum 1, p = v_1 / (1'v_1), and divides by the model variance of p:
        // beta = w'C p / (p'C p) = (1'v_1) (w'C v_1) / (v_1'C v_1), with v_1'C v_1 = lambda_1 + v_1'D v_1 for k = 1.
        // The docs/methods.md values are for divisor T-1; the ratio w'C v_1 / lambda_1 does not depend on the divisor.
        FitResult fit = fitA(1, 0.0);
        FactorModel m = fit.model();
        PortfolioRisk p = RiskCalculator.portfolio(m, new int[] {0, 1, 2, 3}, new double[] {.25, .25, .25, .25},
                null, null, 1.0, FirstFactorBeta.betas(fit, m));
        double[] v1 = {0.716941, 0.513016, 0.211378, 0.422053}; // docs/methods.md section 0
        double lambda = 1.354576 * 5 / 6;                        // docs/methods.md section 0 (divisor 5), to our divisor 6
        double sum = 0;
        double vdv = 0;
        for (int i = 0; i < 4; i++) {
            sum += v1[i];
            vdv += v1[i] * v1[i] * m.specificVariance(i);
        }
        double expected = sum * 0.477983 * lambda / (lambda + vdv);
        // 6 printed decimals of 0.477983, times about 1.86 / 1.02
        assertEquals(expected, p.beta(), 2 * SIX_DECIMALS, "beta");
    }

    @Test
    void dataset_B_has_rank_T_minus_1_and_the_floor_must_bind_at_k_equal_T_minus_1() {
        double[] b = {.01, .02, -.01, 0, .03, -.02, .01, 0, .01, -.01, .03, -.01, .02, .02, 0};
        ReturnPanel p = Fixtures.panel(3, 5, b);
        FitResult r = new FactorFitter(null).fit(p, new FitOptions(new FactorRule.Fixed(5), null, 1.0,
                Basis.COVARIANCE, 0.0), null);
        assertEquals(2, r.rank());
        assertEquals(2, r.model().factors(), "fixed 5 clipped to the rank");
        // printed with 5 significant digits
        assertEquals(9.3333e-4 * 2 / 3, r.eigenvalues()[0], 5e-9, "eigenvalue 1");
        assertEquals(7.0000e-4 * 2 / 3, r.eigenvalues()[1], 5e-9, "eigenvalue 2");
        for (int i = 0; i < 5; i++) {
            assertTrue(Math.abs(r.model().specificVariance(i)) < 1e-18, "residual " + i);
        }
        FitResult floored = new FactorFitter(null).fit(p, new FitOptions(new FactorRule.Fixed(2), null, 1.0,
                Basis.COVARIANCE, 0.05), null);
        double[] c = Fixtures.modelCovariance(floored.model());
        for (int i = 0; i < 5; i++) {
            double sii = c[i * 5 + i] - floored.model().specificVariance(i);
            assertEquals(0.05 * sii, floored.model().specificVariance(i), 1e-15);
        }
    }

    /** docs/methods.md section 0 toy model M. */
    static FactorModel toyM() {
        return new FactorModel(List.of("AQ", "BQ", "CQ"), 2, new double[] {1.0, 0.5, 0.8, -0.3, 1.2, 0.1},
                new double[] {0.04, 0, 0, 0.01}, new double[] {0.02, 0.03, 0.05});
    }

    @Test
    void toy_model_M_portfolio_risk_decomposition() {
        FactorModel m = toyM();
        int[] idx = {0, 1, 2};
        double[] w = {0.5, 0.3, 0.2};
        double third = 1.0 / 3;
        PortfolioRisk p = RiskCalculator.portfolio(m, idx, w, idx, new double[] {third, third, third}, 1.0,
                Fixtures.betas(m));
        close(0.98, p.factorExposures()[0], "x1");
        close(0.18, p.factorExposures()[1], "x2");
        close(0.03874, p.factorVariance(), "factor var");
        close(0.0097, p.specificVariance(), "specific var");
        close(0.04844, p.variance(), "variance");
        close(0.220091, p.volatility(), "vol");
        double[] mcr = {0.227633, 0.180925, 0.259984};
        double[] ccr = {0.113817, 0.054278, 0.051997};
        double[] spec = {0.022718, 0.012268, 0.009087};
        for (int i = 0; i < 3; i++) {
            close(mcr[i], p.marginal()[i], "MCR " + i);
            close(ccr[i], p.contribution()[i], "CCR " + i);
            close(spec[i], p.specificContributions()[i], "specific contribution " + i);
        }
        close(0.174546, p.factorContributions()[0], "factor contribution 1");
        close(0.001472, p.factorContributions()[1], "factor contribution 2");
        close(0.039469, p.trackingError(), "TE vs equal weight");
        double[] sigma = {.0625, .0305, .0485, .0305, .0565, .0381, .0485, .0381, .1077};
        assertArrayEquals(sigma, RiskCalculator.covariance(m, idx, 1.0, false), IDENTITY);
    }

    @Test
    void bai_ng_penalties_for_N500_T252() {
        double[] g = FactorCount.baiNgPenalties(500, 252);
        close(0.030565, g[0], "g1");
        close(0.033001, g[1], "g2");
        close(0.021942, g[2], "g3");
    }

    @Test
    void eigenvalue_ratio_example_chooses_two() {
        double[] ev = {8, 4, 1, .9, .8, .7, .6, .5};
        FactorCountReport r = FactorCount.choose(new FactorRule.EigenvalueRatio(5), ev, 8, 100, 16.5);
        assertEquals(2, r.k());
        double[] er = {2, 4, 1.1111, 1.125, 1.1429}; // docs/methods.md section 2, 4-5 digits
        for (int j = 0; j < 5; j++) {
            assertEquals(er[j], r.values()[j], 5e-5 * er[j], "ER " + (j + 1));
        }
    }

    @Test
    void marchenko_pastur_edges_and_zero_eigenvalues_of_a_wide_noise_panel() {
        double[] a = FactorCount.marchenkoPasturEdges(1, 500, 1000);
        close(2.914214, a[1], "K=500 T=1000 upper");
        close(0.085786, a[0], "K=500 T=1000 lower");
        close(1.438092, FactorCount.marchenkoPasturEdges(1, 10, 252)[1], "K=10 T=252");
        close(5.801308, FactorCount.marchenkoPasturEdges(1, 500, 252)[1], "K=500 T=252");
        // K=500, T=252: exactly K - T + 1 = 249 zero eigenvalues, i.e. rank 251
        Random rnd = new Random(11);
        double[] v = new double[252 * 500];
        for (int x = 0; x < v.length; x++) {
            v[x] = rnd.nextGaussian();
        }
        FitResult r = new FactorFitter(null).fit(Fixtures.panel(252, 500, v), FitOptions.of(new FactorRule.Fixed(1),
                1.0), null);
        assertEquals(251, r.rank());
    }

    @Test
    void half_life_weights_effective_observations_and_weighted_moments() {
        // docs/methods.md section 6: h = 63 -> T_eff(252) = 160.40; lambda = 0.94 (h = 11.2023) -> T_eff = 32.3333
        assertEquals(160.40, FactorFitter.effectiveObservations(FactorFitter.weights(252, 63.0)), 0.005);
        assertEquals(32.3333, FactorFitter.effectiveObservations(FactorFitter.weights(252, 11.2023)), 0.0005);
        // toy r = (1, -1, 2, 0), lambda = 0.5 (h = 1): w = (1, 2, 4, 8)/15, mu = 0.466667, biased var 1.048889
        double[] w = FactorFitter.weights(4, 1.0);
        assertArrayEquals(new double[] {1 / 15.0, 2 / 15.0, 4 / 15.0, 8 / 15.0}, w, IDENTITY);
        FitResult r = new FactorFitter(null).fit(Fixtures.panel(4, 1, new double[] {1, -1, 2, 0}),
                new FitOptions(new FactorRule.Fixed(1), 1.0, 1.0, Basis.COVARIANCE, 0.0), null);
        close(0.466667, r.means()[0], "weighted mean");
        close(1.048889, Fixtures.modelCovariance(r.model())[0], "weighted variance");
    }

    @Test
    void em_completes_a_hidden_cell_of_a_rank_one_matrix() {
        // docs/methods.md section 7: X = u v', u = (1,2,3,4), v = (1,-1,2); hide (4,3) (true 8) -> 8.000000
        double[] x = {1, -1, 2, 2, -2, 4, 3, -3, 6, 4, -4, Double.NaN};
        FactorFitter f = new FactorFitter(null, 1e-14, 20000);
        FitResult r = f.fit(Fixtures.panel(4, 3, x), FitOptions.of(new FactorRule.Fixed(1), 0.75), null);
        assertEquals(1, r.imputation().cells());
        assertTrue(r.imputation().converged(), "converged " + r.imputation());
        // the completed column 3 is (2, 4, 6, 8): its weighted mean is 5
        assertEquals(5.0, r.means()[2], 1e-8);
    }

    @Test
    void randomized_subspace_iteration_reproduces_the_top_of_an_exactly_rank_5_matrix() {
        // docs/methods.md section 1: rank-5 300 x 2000, p = 10, q = 2 -> top-5 singular values to < 1e-10 relative
        int t = 300;
        int k = 2000;
        double[][] pl = Fixtures.planted(t, k, 5, 0.0, 5);
        double[] m = new double[k * t];
        Dense.transpose(pl[0], t, k, m);
        PcaSolver exact = PcaSolver.exact(m, k, t, new Parallel(null));
        double[][] rnd = PcaSolver.randomizedTopK(m, k, t, 5, 10, 2, 99);
        double[] ev = exact.eigenvalues();
        for (int j = 0; j < 5; j++) {
            assertEquals(ev[j], rnd[0][j], 1e-10 * ev[j], "eigenvalue " + j);
            double dot = Math.abs(Dense.dot(rnd[1], j * k, exact.vectors(5), j * k, k));
            assertEquals(1.0, dot, 1e-9, "vector " + j);
        }
    }

    @Test
    void alignment_detects_a_sign_flip_and_a_swap() {
        // docs/methods.md section 8: V_old = [[.5,.5],[.5,.5],[.5,-.5],[.5,-.5]]
        List<String> names = List.of("AQ", "BQ", "CQ", "DQ");
        FactorModel old = new FactorModel(names, 2, new double[] {.5, .5, .5, .5, .5, -.5, .5, -.5},
                new double[] {2, 0, 0, 1}, new double[4]);
        double[] flipped = {-.5, -.5, -.5, -.5, .5, .5, -.5, -.5}; // rows = vectors: column 1 flipped
        AlignmentReport a = SignAlignment.align(flipped, 2, names, null, old);
        assertEquals(List.of(0), a.flipped());
        assertEquals(.5, flipped[0], 0);
        assertEquals(List.of(), a.swaps());
        assertEquals(1.0, a.overlap(), IDENTITY);
        double[] swapped = {.5, .5, -.5, -.5, .5, .5, .5, .5}; // |V_old' V_new| = [[0,1],[1,0]]
        AlignmentReport s = SignAlignment.align(swapped, 2, names, null, old);
        assertArrayEquals(new int[] {1, 0}, s.matched());
        assertEquals(List.of(0, 1), s.swaps());
        assertEquals(List.of(), s.weak());
    }
}
