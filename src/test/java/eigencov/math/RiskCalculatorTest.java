package eigencov.math;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Random;
import org.junit.jupiter.api.Test;

/** Factor-form risk kernels against naive dense formulas (docs/code-style.md practice 12c). */
class RiskCalculatorTest {

    static final double IDENTITY = 1e-12;

    /** A random model with a full (rotated) factor covariance F = A A'. */
    static FactorModel randomModel(int n, int k, long seed) {
        Random r = new Random(seed);
        double[] b = new double[n * k];
        for (int x = 0; x < b.length; x++) {
            b[x] = r.nextGaussian();
        }
        double[] a = new double[k * k];
        for (int x = 0; x < a.length; x++) {
            a[x] = 0.01 * r.nextGaussian();
        }
        double[] f = new double[k * k];
        for (int i = 0; i < k; i++) {
            for (int j = 0; j < k; j++) {
                for (int c = 0; c < k; c++) {
                    f[i * k + j] += a[i * k + c] * a[j * k + c];
                }
            }
        }
        for (int i = 0; i < k; i++) {
            for (int j = 0; j < i; j++) {
                f[i * k + j] = f[j * k + i];
            }
        }
        double[] d = new double[n];
        for (int i = 0; i < n; i++) {
            d[i] = 1e-4 * (1 + r.nextDouble());
        }
        return new FactorModel(Fixtures.names(n), k, b, f, d);
    }

    /** The same exposures and specific variances with F reduced to its diagonal (the PCA fits' case). */
    static FactorModel withDiagonalFactorCovariance(FactorModel m) {
        int k = m.factors();
        double[] f = new double[k * k];
        for (int i = 0; i < k; i++) {
            f[i * k + i] = m.factorCov(i, i);
        }
        return new FactorModel(m.tickers(), k, m.exposures(), f, m.specificVariances());
    }

    /** Naive C = B F B' + D, element by element. */
    static double naive(FactorModel m, int i, int j) {
        int k = m.factors();
        double s = 0;
        for (int a = 0; a < k; a++) {
            for (int b = 0; b < k; b++) {
                s += m.exposure(i, a) * m.factorCov(a, b) * m.exposure(j, b);
            }
        }
        return s + (i == j ? m.specificVariance(i) : 0);
    }

    @Test
    void a_large_covariance_submatrix_matches_the_naive_product_and_is_exactly_symmetric() {
        // 70 names: several mirror tiles (32) and a remainder after the four-at-a-time entries
        FactorModel m = randomModel(200, 7, 5);
        int n = 70;
        int[] idx = new int[n];
        for (int a = 0; a < n; a++) {
            idx[a] = (a * 37 + 11) % 200;
        }
        double[] c = RiskCalculator.covariance(m, idx, 1, false);
        double max = 0;
        for (int a = 0; a < n; a++) {
            max = Math.max(max, naive(m, idx[a], idx[a]));
        }
        for (int a = 0; a < n; a++) {
            for (int b = 0; b < n; b++) {
                assertEquals(naive(m, idx[a], idx[b]), c[a * n + b], IDENTITY * max);
                assertEquals(c[b * n + a], c[a * n + b], 0.0);
            }
        }
    }

    @Test
    void covariance_submatrix_matches_the_naive_product_with_scale_and_correlation() {
        FactorModel m = randomModel(40, 5, 1);
        int[] idx = {7, 3, 39, 0, 12};
        double[] c = RiskCalculator.covariance(m, idx, 252, false);
        double[] corr = RiskCalculator.covariance(m, idx, 252, true);
        double max = 0;
        for (int a = 0; a < idx.length; a++) {
            max = Math.max(max, naive(m, idx[a], idx[a]) * 252);
        }
        for (int a = 0; a < idx.length; a++) {
            for (int b = 0; b < idx.length; b++) {
                double e = naive(m, idx[a], idx[b]);
                assertEquals(e * 252, c[a * idx.length + b], IDENTITY * max);
                double ec = e / Math.sqrt(naive(m, idx[a], idx[a]) * naive(m, idx[b], idx[b]));
                assertEquals(ec, corr[a * idx.length + b], IDENTITY);
            }
        }
    }

    @Test
    void correlation_and_covariance_matrices_are_exactly_symmetric_bit_for_bit() {
        // full F (L != R in the kernel) and diagonal F; correlation scales each entry by two
        // factors whose product rounds differently in the two orders unless one triangle is mirrored
        FactorModel full = randomModel(300, 9, 11);
        FactorModel diagonal = withDiagonalFactorCovariance(full);
        int n = 120;
        int[] idx = new int[n];
        for (int a = 0; a < n; a++) {
            idx[a] = (a * 53 + 17) % 300;
        }
        for (FactorModel m : new FactorModel[] {full, diagonal}) {
            for (boolean correlation : new boolean[] {false, true}) {
                double[] c = RiskCalculator.covariance(m, idx, 252, correlation);
                int asymmetric = 0;
                for (int a = 0; a < n; a++) {
                    for (int b = 0; b < a; b++) {
                        if (Double.doubleToRawLongBits(c[a * n + b]) != Double.doubleToRawLongBits(c[b * n + a])) asymmetric++;
                    }
                }
                assertEquals(0, asymmetric, (m == full ? "full" : "diagonal") + " F, correlation=" + correlation
                        + ": off-diagonal pairs that differ");
                if (correlation) {
                    for (int a = 0; a < n; a++) assertEquals(1.0, c[a * n + a], 0.0);
                }
            }
        }
    }

    @Test
    void portfolio_and_active_risk_match_dense_quadratic_forms_and_sum_to_the_totals() {
        FactorModel m = randomModel(60, 4, 2);
        Random r = new Random(3);
        int[] idx = {1, 5, 9, 20, 33};
        double[] w = new double[idx.length];
        for (int a = 0; a < w.length; a++) {
            w[a] = r.nextGaussian();
        }
        int[] bench = {5, 40, 41, 1};
        double[] bw = {0.25, 0.25, 0.25, 0.25};
        PortfolioRisk p = RiskCalculator.portfolio(m, idx, w, bench, bw, 21, Fixtures.betas(m));
        double quad = 0;
        for (int a = 0; a < idx.length; a++) {
            for (int b = 0; b < idx.length; b++) {
                quad += w[a] * naive(m, idx[a], idx[b]) * w[b];
            }
        }
        assertEquals(21 * quad, p.variance(), 1e-12 * 21 * quad);
        ActiveRisk act = p.active();
        // union: portfolio names, then benchmark-only names 40, 41
        assertArrayEquals(new int[] {1, 5, 9, 20, 33, 40, 41}, act.indices());
        double[] aw = act.activeWeights();
        assertEquals(w[0] - 0.25, aw[0], 0);
        assertEquals(w[1] - 0.25, aw[1], 0);
        assertEquals(-0.25, aw[5], 0);
        double te2 = 0;
        int[] u = act.indices();
        for (int a = 0; a < u.length; a++) {
            for (int b = 0; b < u.length; b++) {
                te2 += aw[a] * naive(m, u[a], u[b]) * aw[b];
            }
        }
        assertEquals(Math.sqrt(21 * te2), p.trackingError(), 1e-12 * Math.sqrt(21 * te2));
        assertEquals(p.trackingError(), sum(act.contribution()), IDENTITY * p.trackingError());
        assertEquals(p.trackingError(), sum(act.factorContributions()) + sum(act.specificContributions()),
                IDENTITY * p.trackingError());
        assertEquals(p.volatility(), sum(p.contribution()), IDENTITY * p.volatility());
        // marginal = d vol / d w_i, checked by central differences
        for (int a = 0; a < idx.length; a++) {
            double h = 1e-6;
            double[] up = w.clone();
            double[] dn = w.clone();
            up[a] += h;
            dn[a] -= h;
            double deriv = (RiskCalculator.volatility(m, idx, up, 21) - RiskCalculator.volatility(m, idx, dn, 21))
                    / (2 * h);
            assertEquals(deriv, p.marginal()[a], 1e-6 * Math.abs(deriv) + 1e-9, "marginal " + a);
        }
        // betas: each asset's is its model row's, the portfolio's is w'beta
        double[] rowBetas = Fixtures.betas(m);
        double wb = 0;
        for (int a = 0; a < idx.length; a++) {
            assertEquals(rowBetas[idx[a]], p.assetBetas()[a], 0);
            wb += w[a] * rowBetas[idx[a]];
        }
        assertEquals(wb, p.beta(), IDENTITY * Math.abs(wb));
    }

    @Test
    void zero_weight_portfolio_has_zero_volatility_not_nan() {
        FactorModel m = randomModel(10, 2, 4);
        PortfolioRisk p = RiskCalculator.portfolio(m, new int[] {1, 2}, new double[] {0, 0}, null, null, 1, Fixtures.betas(m));
        assertEquals(0, p.volatility(), 0);
        assertEquals(0, p.marginal()[0], 0);
        assertEquals(0, p.contribution()[1], 0);
        assertEquals(0, p.factorContributions()[0], 0);
        assertNull(p.trackingError());
        assertNull(p.active());
        PortfolioRisk same = RiskCalculator.portfolio(m, new int[] {1}, new double[] {1}, new int[] {1},
                new double[] {1}, 1, Fixtures.betas(m));
        assertEquals(0, same.trackingError(), 0);
        assertTrue(Double.isFinite(same.active().marginal()[0]));
    }

    @Test
    void volatility_fast_path_equals_the_full_decomposition() {
        FactorModel m = randomModel(300, 10, 5);
        Random r = new Random(6);
        int[] idx = new int[300];
        double[] w = new double[300];
        for (int i = 0; i < 300; i++) {
            idx[i] = i;
            w[i] = r.nextDouble();
        }
        double full = RiskCalculator.portfolio(m, idx, w, null, null, 252, Fixtures.betas(m)).volatility();
        assertEquals(full, RiskCalculator.volatility(m, idx, w, 252), IDENTITY * full);
    }

    @Test
    void bad_arguments_are_rejected_with_the_position() {
        FactorModel m = randomModel(5, 2, 7);
        IllegalArgumentException dup = assertThrows(IllegalArgumentException.class,
                () -> RiskCalculator.covariance(m, new int[] {1, 1}, 1, false));
        assertTrue(dup.getMessage().contains("idx[1]"), dup.getMessage());
        assertThrows(IllegalArgumentException.class, () -> RiskCalculator.covariance(m, new int[] {5}, 1, false));
        assertThrows(IllegalArgumentException.class,
                () -> RiskCalculator.portfolio(m, new int[] {0}, new double[] {1, 2}, null, null, 1, new double[5]));
        assertThrows(IllegalArgumentException.class,
                () -> RiskCalculator.portfolio(m, new int[] {0}, new double[] {Double.NaN}, null, null, 1, new double[5]));
        assertThrows(IllegalArgumentException.class,
                () -> RiskCalculator.portfolio(m, new int[] {0}, new double[] {1}, new int[] {0}, null, 1, new double[5]));
        assertThrows(IllegalArgumentException.class, () -> RiskCalculator.covariance(m, new int[] {0}, 0, false));
        assertThrows(IllegalArgumentException.class,
                () -> RiskCalculator.portfolio(m, new int[] {0}, new double[] {1}, null, null, 1, new double[4]));
    }

    static double sum(double[] x) {
        double s = 0;
        for (double v : x) {
            s += v;
        }
        return s;
    }
}
