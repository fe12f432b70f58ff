package eigencov.math;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Random;
import org.ejml.data.DMatrixRMaj;
import org.ejml.dense.row.CommonOps_DDRM;
import org.ejml.dense.row.factory.DecompositionFactory_DDRM;
import org.ejml.interfaces.decomposition.EigenDecomposition_F64;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

/**
 * Whole fits on random panels of many shapes against EJML 0.46.1 (test-scope oracle: dense
 * symmetric eigen of the explicitly formed K x K covariance or correlation), plus the published
 * invariants of principal components (issue 3).
 */
class EjmlOracleTest {

    /** Eigenvalues after a decomposition, relative to lambda_1: Gram-route errors are about eps * lambda_1 * n. */
    static final double EIG_TOL = 1e-11;
    /** Vector entries where the gap to the neighbours is at least 1e-3 lambda_1. */
    static final double VEC_TOL = 1e-8;
    /** Algebraic identities (orthonormality, Euler sums), relative to the scale of the quantity. */
    static final double IDENTITY = 1e-12;

    /** Random panel; {@code latent > 0} builds every column from that many latent series (rank deficiency). */
    static double[] panel(int t, int k, int latent, long seed) {
        Random r = new Random(seed);
        double[] v = new double[t * k];
        if (latent == 0) {
            for (int x = 0; x < v.length; x++) {
                v[x] = 0.01 * r.nextGaussian() + 0.001;
            }
            return v;
        }
        double[] f = new double[t * latent];
        for (int x = 0; x < f.length; x++) {
            f[x] = 0.01 * r.nextGaussian();
        }
        double[] l = new double[k * latent];
        for (int x = 0; x < l.length; x++) {
            l[x] = r.nextGaussian();
        }
        for (int s = 0; s < t; s++) {
            for (int i = 0; i < k; i++) {
                double sum = 0;
                for (int c = 0; c < latent; c++) {
                    sum += f[s * latent + c] * l[i * latent + c];
                }
                v[s * k + i] = sum;
            }
        }
        return v;
    }

    /** The decomposed matrix formed naively: weighted covariance, or correlation. */
    static double[] denseMatrix(double[] v, int t, int k, double[] w, boolean correlation) {
        double[] x = new double[t * k];
        for (int i = 0; i < k; i++) {
            double mu = 0;
            for (int s = 0; s < t; s++) {
                mu += w[s] * v[s * k + i];
            }
            for (int s = 0; s < t; s++) {
                x[s * k + i] = Math.sqrt(w[s]) * (v[s * k + i] - mu);
            }
        }
        DMatrixRMaj xm = new DMatrixRMaj(t, k, true, x);
        DMatrixRMaj sm = new DMatrixRMaj(k, k);
        CommonOps_DDRM.multTransA(xm, xm, sm);
        double[] s = sm.data;
        if (correlation) {
            double[] sd = new double[k];
            for (int i = 0; i < k; i++) {
                sd[i] = Math.sqrt(s[i * k + i]);
            }
            for (int i = 0; i < k; i++) {
                for (int j = 0; j < k; j++) {
                    s[i * k + j] /= sd[i] * sd[j];
                }
            }
        }
        return s;
    }

    /** {eigenvalues descending (k), eigenvectors as rows (k x k)} from EJML. */
    static double[][] ejml(double[] s, int k) {
        EigenDecomposition_F64<DMatrixRMaj> eig = DecompositionFactory_DDRM.eig(k, true, true);
        assertTrue(eig.decompose(new DMatrixRMaj(k, k, true, s.clone())));
        Integer[] order = new Integer[k];
        for (int i = 0; i < k; i++) {
            order[i] = i;
        }
        java.util.Arrays.sort(order, (a, b) -> Double.compare(eig.getEigenvalue(b).getReal(),
                eig.getEigenvalue(a).getReal()));
        double[] w = new double[k];
        double[] v = new double[k * k];
        for (int j = 0; j < k; j++) {
            w[j] = eig.getEigenvalue(order[j]).getReal();
            DMatrixRMaj vec = eig.getEigenVector(order[j]);
            for (int i = 0; i < k; i++) {
                v[j * k + i] = vec.get(i, 0);
            }
        }
        return new double[][] {w, v};
    }

    @ParameterizedTest(name = "T={0} K={1} latent={2} halfLife={3} {4}")
    @CsvSource({
        "60, 10, 0, 0, COVARIANCE",
        "40, 40, 0, 0, COVARIANCE",
        "41, 40, 0, 20, COVARIANCE",
        "25, 200, 0, 0, COVARIANCE",
        "30, 90, 5, 0, COVARIANCE",
        "80, 30, 4, 0, COVARIANCE",
        "50, 12, 0, 10, CORRELATION",
        "20, 150, 0, 0, CORRELATION"})
    void fit_matches_ejml_and_satisfies_pca_invariants(int t, int k, int latent, int halfLife, Basis basis) {
        double[] v = panel(t, k, latent, 31L * t + k);
        Double h = halfLife == 0 ? null : (double) halfLife;
        double[] w = FactorFitter.weights(t, h);
        boolean corr = basis == Basis.CORRELATION;
        double[] s = denseMatrix(v, t, k, w, corr);
        double[][] oracle = ejml(s, k);
        double[] ev = oracle[0];
        int kk = Math.min(6, Math.min(k, t - 1));
        if (latent > 0) {
            kk = Math.min(kk, latent);
        }
        FitResult r = new FactorFitter(null).fit(Fixtures.panel(t, k, v),
                new FitOptions(new FactorRule.Fixed(kk), h, 1.0, basis, 0.0), null);
        int expectedRank = latent > 0 ? latent : Math.min(k, t - 1);
        assertEquals(expectedRank, r.rank(), "rank <= min(K, T-1)");
        double l1 = ev[0];
        for (int j = 0; j < k; j++) {
            double ours = j < r.rank() ? r.eigenvalues()[j] : 0;
            assertEquals(ev[j], ours, EIG_TOL * l1 * Math.max(1, Math.max(k, t) / 10.0), "eigenvalue " + j);
        }
        // eigenvectors where the gap is clear (exposure = sigma_i e_i for correlation)
        FactorModel m = r.model();
        double[] sigma = new double[k];
        double[] cov = denseMatrix(v, t, k, w, false);
        for (int i = 0; i < k; i++) {
            sigma[i] = corr ? Math.sqrt(cov[i * k + i]) : 1;
        }
        for (int j = 0; j < kk; j++) {
            double gap = Math.min(j == 0 ? l1 : ev[j - 1] - ev[j], ev[j] - ev[j + 1]);
            if (gap < 1e-3 * l1) {
                continue;
            }
            double dot = 0;
            for (int i = 0; i < k; i++) {
                dot += oracle[1][j * k + i] * m.exposure(i, j) / sigma[i];
            }
            for (int i = 0; i < k; i++) {
                assertEquals(oracle[1][j * k + i] * Math.signum(dot), m.exposure(i, j) / sigma[i], VEC_TOL,
                        "vector " + j + " entry " + i);
            }
        }
        assertInvariants(r, w, cov, k, corr);
    }

    static void assertInvariants(FitResult r, double[] w, double[] cov, int k, boolean corr) {
        FactorModel m = r.model();
        int f = m.factors();
        int t = w.length;
        double l1 = r.eigenvalues()[0];
        // factor returns: weighted covariance diag(lambda) (docs/design.md section 3)
        double[] fr = r.factorReturns();
        for (int a = 0; a < f; a++) {
            double mean = 0;
            for (int s = 0; s < t; s++) {
                mean += w[s] * fr[s * f + a];
            }
            assertEquals(0, mean, IDENTITY * Math.sqrt(l1), "weighted mean of factor return " + a);
            for (int b = 0; b < f; b++) {
                double c = 0;
                for (int s = 0; s < t; s++) {
                    c += w[s] * fr[s * f + a] * fr[s * f + b];
                }
                assertEquals(a == b ? r.eigenvalues()[a] : 0, c, 1e-11 * l1, "factor return cov " + a + "," + b);
            }
        }
        // E orthonormal (exposures divided by sigma for correlation)
        for (int a = 0; a < f; a++) {
            for (int b = 0; b < f; b++) {
                double d = 0;
                for (int i = 0; i < k; i++) {
                    double si = corr ? cov[i * k + i] : 1;
                    d += m.exposure(i, a) * m.exposure(i, b) / si;
                }
                assertEquals(a == b ? 1 : 0, d, 1e-10, "E'E " + a + "," + b);
            }
        }
        // model covariance symmetric PSD, diagonal = S_ii where the floor (0 here) is inactive
        double[] c = Fixtures.modelCovariance(m);
        double max = Fixtures.maxAbs(c);
        for (int i = 0; i < k; i++) {
            assertEquals(cov[i * k + i], c[i * k + i], 1e-12 * max, "diag " + i);
            for (int j = 0; j < i; j++) {
                assertEquals(c[i * k + j], c[j * k + i], 0.0, "symmetry");
            }
        }
        double[] mev = ejml(c, k)[0];
        assertTrue(mev[k - 1] >= -1e-12 * max, "PSD: smallest eigenvalue " + mev[k - 1]);
        // contributions sum to volatility (Euler), for a long/short portfolio
        Random rnd = new Random(k);
        int[] idx = new int[k];
        double[] wt = new double[k];
        for (int i = 0; i < k; i++) {
            idx[i] = i;
            wt[i] = rnd.nextGaussian();
        }
        PortfolioRisk p = RiskCalculator.portfolio(m, idx, wt, null, null, 1.0, Fixtures.betas(m));
        double sum = 0;
        double split = 0;
        double quad = 0;
        for (int i = 0; i < k; i++) {
            sum += p.contribution()[i];
            split += p.specificContributions()[i];
            for (int j = 0; j < k; j++) {
                quad += wt[i] * c[i * k + j] * wt[j];
            }
        }
        for (double fc : p.factorContributions()) {
            split += fc;
        }
        assertEquals(p.volatility(), sum, IDENTITY * p.volatility(), "component contributions sum to vol");
        assertEquals(p.volatility(), split, IDENTITY * p.volatility(), "factor + specific contributions sum to vol");
        assertEquals(quad, p.variance(), 1e-12 * quad, "w'Cw from the dense model matrix");
    }
}
