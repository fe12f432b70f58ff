package eigencov.math;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.EnumSource;

import java.util.Random;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/** First-factor beta (docs/design.md section 6): {@code p} is the first factor's portfolio, {@code beta = C p / p'C p}. */
class FirstFactorBetaTest {
    private static final int T = 1000;
    private static final int K = 200;
    private static final double MARKET_SD = 0.01;
    private static final double SPECIFIC_SD = 0.005;
    /** Rounding only. */
    private static final double IDENTITY = 1e-12;

    /** One planted factor: r_ti = beta_i m_t + e_ti, beta_i in [0.5, 1.5], seeded. Returns {values, betas}. */
    private static double[][] oneFactor(long seed) {
        Random rnd = new Random(seed);
        double[] beta = new double[K];
        for (int i = 0; i < K; i++) beta[i] = 0.5 + rnd.nextDouble();
        double[] v = new double[T * K];
        for (int t = 0; t < T; t++) {
            double m = MARKET_SD * rnd.nextGaussian();
            for (int i = 0; i < K; i++) v[t * K + i] = beta[i] * m + SPECIFIC_SD * rnd.nextGaussian();
        }
        return new double[][] {v, beta};
    }

    private static FitResult fit(ReturnPanel panel, Basis basis, int k) {
        return new FactorFitter(null).fit(panel, new FitOptions(new FactorRule.Fixed(k), null, 1.0, basis, 0.05), null);
    }

    private static double dot(double[] a, double[] b) {
        double s = 0;
        for (int i = 0; i < a.length; i++) s += a[i] * b[i];
        return s;
    }

    @ParameterizedTest
    @EnumSource(Basis.class)
    void the_portfolio_sums_to_one_its_return_is_the_first_factor_return_and_p_beta_is_one(Basis basis) {
        ReturnPanel panel = Fixtures.panel(T, K, oneFactor(1L)[0]);
        FitResult fit = fit(panel, basis, 3);
        double[] p = FirstFactorBeta.portfolio(fit);
        double sum = 0;
        for (double x : p) sum += x;
        assertEquals(1, sum, IDENTITY);
        // p's return, demeaned, is f_1 up to p's scale: (x_t - mu)'p = f_1,t / s for one s over all dates
        double[] f = fit.factorReturns();
        double[] mu = fit.means();
        double s = 0;
        for (int t = 0; t < T; t++) {
            double r = 0;
            for (int i = 0; i < K; i++) r += p[i] * (panel.value(t, i) - mu[i]);
            if (t == 0) s = f[0] / r;
            assertEquals(f[t * 3], s * r, 1e-9 * Math.abs(f[t * 3]) + 1e-15, "date " + t);
        }
        double[] beta = FirstFactorBeta.betas(fit, fit.model());
        assertEquals(1, dot(p, beta), IDENTITY, "p'beta");
    }

    @Test
    void after_a_rotation_p_still_earns_the_first_factor_return() {
        // alignment rotate: f~ = R'f, B~ = B R; the first factor's weights are column 1 of B~ (covariance basis)
        double[] v = oneFactor(2L)[0];
        ReturnPanel first = Fixtures.panel(T, K, v);
        FitOptions rotate = new FitOptions(new FactorRule.Fixed(3), null, 1.0, Basis.COVARIANCE, 0.05, FactorHold.NONE, true);
        FitResult a = new FactorFitter(null).fit(first, rotate, null);
        double[] shifted = new double[(T - 50) * K];
        System.arraycopy(v, 50 * K, shifted, 0, shifted.length);
        ReturnPanel later = new ReturnPanel(Fixtures.days(T).subList(50, T), Fixtures.names(K), shifted);
        FitResult b = new FactorFitter(null).fit(later, rotate, a.model());
        assertTrue(b.alignment().rotation().applied(), b.alignment().rotation().reason());
        double[] p = FirstFactorBeta.portfolio(b);
        double[] f = b.factorReturns();
        double[] mu = b.means();
        double s = 0;
        for (int t = 0; t < T - 50; t++) {
            double r = 0;
            for (int i = 0; i < K; i++) r += p[i] * (later.value(t, i) - mu[i]);
            if (t == 0) s = f[0] / r;
            assertEquals(f[t * 3], s * r, 1e-9 * Math.abs(f[t * 3]) + 1e-15, "date " + t);
        }
        assertEquals(1, dot(p, FirstFactorBeta.betas(b, b.model())), IDENTITY);
    }

    @Test
    void on_a_planted_one_factor_panel_the_betas_are_the_planted_ones_up_to_the_scale_of_p() {
        double[][] planted = oneFactor(3L);
        FitResult fit = fit(Fixtures.panel(T, K, planted[0]), Basis.COVARIANCE, 1);
        double[] p = FirstFactorBeta.portfolio(fit);
        double[] beta = FirstFactorBeta.betas(fit, fit.model());
        // r_p = (p'beta) m + p'e, so the model's beta_i is the planted beta_i / (p'beta) up to sampling error
        double c = dot(p, planted[1]);
        // Tolerance: 4 standard errors of a regression slope, sigma_e / (sqrt(T) sigma_m) (Greene, Econometric
        // Analysis; from memory) = 0.005 / (31.6 x 0.01) = 0.016, plus the diversified specific term of order
        // sigma_e^2 / (K sigma_m^2) = 1.3e-3.
        double tol = 4 * SPECIFIC_SD / (Math.sqrt(T) * MARKET_SD) + SPECIFIC_SD * SPECIFIC_SD / (K * MARKET_SD * MARKET_SD);
        double typical = 0;
        for (int i = 0; i < K; i++) {
            assertEquals(planted[1][i], c * beta[i], tol, "name " + i);
            typical += beta[i] / K;
        }
        // near 1: p leans to high-beta names (p ~ e_1 ~ beta), so p'beta = E[beta^2] / E[beta] = 13/12 for betas
        // uniform on [0.5, 1.5] and the unweighted mean model beta is about 12/13 = 0.92
        assertEquals(1, typical, 0.1, "a typical name has a beta near 1 (here p'beta = " + c + ")");
    }

    @ParameterizedTest
    @EnumSource(Basis.class)
    void the_betas_agree_with_least_squares_on_the_first_factor_portfolio_where_the_floor_is_inactive(Basis basis) {
        double[][] planted = oneFactor(4L);
        ReturnPanel panel = Fixtures.panel(T, K, planted[0]);
        FitResult fit = fit(panel, basis, 1);
        double[] p = FirstFactorBeta.portfolio(fit);
        double[] beta = FirstFactorBeta.betas(fit, fit.model());
        // textbook least squares slope of x_i on r_p = p'x over the window: sum (x - xbar)(r - rbar) / sum (r - rbar)^2
        double[] r = new double[T];
        double rbar = 0;
        for (int t = 0; t < T; t++) {
            for (int i = 0; i < K; i++) r[t] += p[i] * panel.value(t, i);
            rbar += r[t] / T;
        }
        double srr = 0;
        for (int t = 0; t < T; t++) srr += (r[t] - rbar) * (r[t] - rbar);
        // The model's beta is (S p + D p)_i / (p'S p + p'D p) where least squares gives (S p)_i / p'S p (docs/methods.md
        // section 9: the model's beta to PC1 adds w'D v_1 / lambda_1): they differ by terms of order
        // sigma_e^2 / (K sigma_m^2) = 1.3e-3 on this panel; 5e-3 allows four times that.
        double tol = 5e-3;
        int checked = 0;
        double[] variances = fit.variances();
        for (int i = 0; i < K; i++) {
            if (!(fit.model().specificVariance(i) > 0.05 * variances[i] * (1 + 1e-9))) continue;
            double xbar = 0;
            for (int t = 0; t < T; t++) xbar += panel.value(t, i) / T;
            double sxr = 0;
            for (int t = 0; t < T; t++) sxr += (panel.value(t, i) - xbar) * (r[t] - rbar);
            assertEquals(sxr / srr, beta[i], tol, "name " + i);
            checked++;
        }
        assertTrue(checked > K * 9 / 10, "floor inactive for most names: " + checked);
    }

    @Test
    void betas_of_every_row_come_from_the_factor_form_as_C_p_over_p_C_p() {
        // against the dense C = B F B' + D (docs/methods.md section 0 toy model M; p chosen here)
        FactorModel m = new FactorModel(java.util.List.of("AQ", "BQ", "CQ"), 2, new double[] {1.0, 0.5, 0.8, -0.3, 1.2, 0.1},
                new double[] {0.04, 0, 0, 0.01}, new double[] {0.02, 0.03, 0.05});
        double[] c = {.0625, .0305, .0485, .0305, .0565, .0381, .0485, .0381, .1077}; // docs/methods.md section 0, printed exactly
        double[] p = {0.5, 0.3, 0.2};
        double[] cp = new double[3];
        for (int i = 0; i < 3; i++) for (int j = 0; j < 3; j++) cp[i] += c[i * 3 + j] * p[j];
        double pcp = dot(p, cp);
        double[] beta = FirstFactorBeta.betas(m, p);
        for (int i = 0; i < 3; i++) assertEquals(cp[i] / pcp, beta[i], 1e-12, "row " + i);
    }
}
