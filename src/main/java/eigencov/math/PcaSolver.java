package eigencov.math;

import java.util.Random;

/**
 * Principal components of S = M M' for a ticker-major data matrix M (K x T, row i = the
 * weighted, demeaned and possibly standardised series of ticker i), without forming K x K when
 * K > T (docs/methods.md section 1).
 * <ul>
 * <li>K <= T: S (K x K) = X'X with X = M' (T x K), then the symmetric eigensolver.</li>
 * <li>K > T: the Gram matrix G = M'M (T x T) has the same non-zero eigenvalues; if G u = lambda u
 * then v = M u / sqrt(lambda) is the unit eigenvector of S.</li>
 * <li>{@link #randomized}: top-k by randomized subspace iteration (Halko, Martinsson and Tropp 2011).</li>
 * </ul>
 */
public final class PcaSolver {

    private final double[] m;
    private final int assets;
    private final int dates;
    private final boolean gram;
    private final SymmetricEigen eig;
    private final int rank;
    private final double[] values;
    private final Parallel par;

    private PcaSolver(double[] m, int assets, int dates, boolean gram, SymmetricEigen eig, Parallel par) {
        this.m = m;
        this.assets = assets;
        this.dates = dates;
        this.gram = gram;
        this.eig = eig;
        this.par = par;
        double[] w = eig.eigenvalues();
        double tol = rankTolerance(assets, dates, w.length == 0 ? 0 : w[0]);
        int r = 0;
        while (r < w.length && w[r] > tol) {
            r++;
        }
        // demeaned data: rank <= min(K, T - 1) (docs/methods.md section 1)
        this.rank = Math.min(r, Math.min(assets, dates - 1));
        this.values = java.util.Arrays.copyOf(w, this.rank);
    }

    /**
     * Eigenvalues at or below {@code max(K, T) * eps * lambda_1} are numerically zero: the error of a
     * backward-stable symmetric eigensolver is a small multiple of eps ||S|| (docs/methods.md section 11
     * uses eps K lambda_1).
     */
    public static double rankTolerance(int assets, int dates, double largest) {
        return Math.max(assets, dates) * SymmetricEigen.EPS * Math.max(largest, 0);
    }

    /** Exact decomposition of M M' (M is K x T row-major, not modified). */
    static PcaSolver exact(double[] m, int assets, int dates, Parallel par) {
        if (assets <= dates) {
            double[] x = new double[dates * assets];
            Dense.transpose(m, assets, dates, x);
            double[] s = new double[assets * assets];
            Dense.crossProduct(x, dates, assets, s, par);
            return new PcaSolver(m, assets, dates, false, SymmetricEigen.decompose(s, assets, par), par);
        }
        double[] g = new double[dates * dates];
        Dense.crossProduct(m, assets, dates, g, par);
        return new PcaSolver(m, assets, dates, true, SymmetricEigen.decompose(g, dates, par), par);
    }

    /** Whether the T x T Gram route was used. */
    boolean usedGram() {
        return gram;
    }

    int rank() {
        return rank;
    }

    /** The rank non-zero eigenvalues, descending. */
    double[] eigenvalues() {
        return values.clone();
    }

    /** Unit eigenvectors of S for the k largest eigenvalues, as rows (k x K); k <= rank. */
    double[] vectors(int k) {
        if (k > rank) {
            throw new IllegalArgumentException("asked for " + k + " vectors, rank is " + rank);
        }
        if (!gram) {
            return eig.leadingVectors(k);
        }
        double[] u = eig.leadingVectors(k);
        double[] v = new double[k * assets];
        Dense.rowDots(u, k, dates, m, assets, v, par);
        for (int c = 0; c < k; c++) {
            double inv = 1.0 / Math.sqrt(values[c]);
            int o = c * assets;
            for (int i = 0; i < assets; i++) {
                v[o + i] *= inv;
            }
        }
        return v;
    }

    /**
     * Top-k eigenpairs of M M' by randomized subspace iteration: Q = orth(Omega), then
     * {@code powerIterations} times Q = orth(Q M M'), then Rayleigh-Ritz on Q. Omega is Gaussian
     * from {@code seed} (k + oversample rows), or {@code start} (rows, orthonormalised here) when given.
     *
     * @return {eigenvalues (k), vectors (k x K rows)}
     */
    static double[][] randomized(double[] m, int assets, int dates, int k, int oversample,
                                        int powerIterations, long seed, double[] start, Parallel par) {
        int l = Math.min(Math.min(assets, dates), k + oversample);
        if (k < 1 || k > l) {
            throw new IllegalArgumentException("k = " + k + " must be in [1, min(K, T)] for K = " + assets
                    + ", T = " + dates);
        }
        double[] q = new double[l * assets];
        if (start != null) {
            int given = Math.min(start.length / assets, l);
            System.arraycopy(start, 0, q, 0, given * assets);
            Random r = new Random(seed);
            for (int x = given * assets; x < q.length; x++) {
                q[x] = r.nextGaussian();
            }
        } else {
            Random r = new Random(seed);
            for (int x = 0; x < q.length; x++) {
                q[x] = r.nextGaussian();
            }
        }
        int lq = Dense.orthonormalizeRows(q, l, assets);
        double[] y = new double[l * dates];
        for (int it = 0; it < powerIterations; it++) {
            Dense.leftMultiply(q, lq, m, assets, dates, y, par);
            Dense.rowDots(y, lq, dates, m, assets, q, par);
            lq = Dense.orthonormalizeRows(q, lq, assets);
        }
        Dense.leftMultiply(q, lq, m, assets, dates, y, par);
        double[] h = new double[lq * lq];
        Dense.rowDots(y, lq, dates, y, lq, h, par);
        SymmetricEigen small = SymmetricEigen.decompose(h, lq);
        int kk = Math.min(k, lq);
        double[] z = small.leadingVectors(kk);
        double[] v = new double[kk * assets];
        Dense.leftMultiply(z, kk, q, lq, assets, v, par);
        double[] w = new double[kk];
        for (int j = 0; j < kk; j++) {
            w[j] = Math.max(0, small.eigenvalue(j));
        }
        return new double[][] {w, v};
    }

    /** Convenience for callers outside the package: single-threaded {@link #randomized}. */
    public static double[][] randomizedTopK(double[] m, int assets, int dates, int k, int oversample,
                                            int powerIterations, long seed) {
        return randomized(m, assets, dates, k, oversample, powerIterations, seed, null, new Parallel(null));
    }
}
