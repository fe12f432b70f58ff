package eigencov.math;

/**
 * The inverse of a factor-form covariance {@code C = B F B' + D} on a set of names, without ever
 * inverting an n x n matrix: Woodbury's identity
 * {@code C^-1 = D^-1 - D^-1 B (F^-1 + B' D^-1 B)^-1 B' D^-1} and the matrix determinant lemma
 * {@code ln|C| = ln|D| + ln|F| + ln|F^-1 + B' D^-1 B|} (Golub and Van Loan, Matrix Computations,
 * 4th ed., 2013; docs/methods.md section 11). Everything is O(n k^2) apart from the explicit
 * inverse, which costs O(n^2 k) for its n^2 entries.
 *
 * <p>Built once for a name set, then {@link #solve}, {@link #quadraticForm} and
 * {@link #minimumVariance} are O(n k) each. Immutable after construction; safe to share.
 *
 * <p>The inverse exists only when every specific variance is positive (F is positive definite for
 * every fit: its eigenvalues are the kept, non-zero ones); otherwise the constructor throws
 * {@link SingularCovarianceException} naming the positions.
 */
public final class FactorInverse implements CovarianceInverse {

    private final int n;
    private final int k;
    /** 1 / d_i. */
    private final double[] dInv;
    /** W = D^-1 B L^-T (n x k row-major), where L L' = M = F^-1 + B' D^-1 B; then C^-1 = D^-1 - W W'. */
    private final double[] w;
    private final double logDet;

    private FactorInverse(int n, int k, double[] dInv, double[] w, double logDet) {
        this.n = n;
        this.k = k;
        this.dInv = dInv;
        this.w = w;
        this.logDet = logDet;
    }

    /** The inverse of the model's covariance on the rows {@code idx} (positions in {@link FactorModel#tickers()}). */
    public static FactorInverse of(FactorModel m, int[] idx) {
        int k = m.factors();
        double[] b = m.exposuresView();
        double[] bs = new double[idx.length * k];
        double[] ds = new double[idx.length];
        for (int a = 0; a < idx.length; a++) {
            int i = idx[a];
            if (i < 0 || i >= m.size()) {
                throw new IllegalArgumentException("idx[" + a + "] = " + i + " is not a row of the model (size " + m.size() + ")");
            }
            System.arraycopy(b, i * k, bs, a * k, k);
            ds[a] = m.specificVariance(i);
        }
        return of(bs, idx.length, k, m.factorCovarianceView(), ds);
    }

    /**
     * The inverse of {@code B F B' + D} for B (n x k row-major), F (k x k row-major, symmetric positive
     * definite) and the n specific variances d. The arrays are read, not kept.
     */
    public static FactorInverse of(double[] b, int n, int k, double[] f, double[] d) {
        if (n < 1 || k < 1) throw new IllegalArgumentException("need n >= 1 and k >= 1, were " + n + " and " + k);
        if (b.length != (long) n * k) throw new IllegalArgumentException("B length " + b.length + " != " + n + " x " + k);
        if (f.length != k * k) throw new IllegalArgumentException("F length " + f.length + " != " + k + " x " + k);
        if (d.length != n) throw new IllegalArgumentException("d length " + d.length + " != " + n);
        int zeros = 0;
        for (double v : d) {
            if (!(v > 0) || Double.isInfinite(v)) zeros++;
        }
        if (zeros > 0) {
            int[] at = new int[zeros];
            for (int i = 0, z = 0; i < n; i++) {
                if (!(d[i] > 0) || Double.isInfinite(d[i])) at[z++] = i;
            }
            throw new SingularCovarianceException(at);
        }
        double[] dInv = new double[n];
        double logDet = 0;
        for (int i = 0; i < n; i++) {
            dInv[i] = 1.0 / d[i];
            logDet += Math.log(d[i]);
        }
        // F^-1 through its Cholesky factor: ln|F| = 2 sum ln L_jj.
        double[] lf = f.clone();
        if (!cholesky(lf, k)) throw new IllegalArgumentException("factor covariance F is not positive definite");
        for (int j = 0; j < k; j++) logDet += 2 * Math.log(lf[j * k + j]);
        double[] mm = inverseFromCholesky(lf, k);
        // M = F^-1 + B' D^-1 B (k x k): n rank-one updates, lower triangle, then mirrored.
        for (int a = 0; a < n; a++) {
            int o = a * k;
            double s = dInv[a];
            for (int p = 0; p < k; p++) {
                double bp = b[o + p] * s;
                if (bp == 0) continue;
                int row = p * k;
                for (int q = 0; q <= p; q++) mm[row + q] += bp * b[o + q];
            }
        }
        for (int p = 0; p < k; p++) {
            for (int q = p + 1; q < k; q++) mm[p * k + q] = mm[q * k + p];
        }
        if (!cholesky(mm, k)) throw new IllegalArgumentException("F^-1 + B' D^-1 B is not positive definite");
        for (int j = 0; j < k; j++) logDet += 2 * Math.log(mm[j * k + j]);
        // W = D^-1 B L^-T: row a solves L w_a = d_a^-1 b_a (forward substitution).
        double[] w = new double[n * k];
        for (int a = 0; a < n; a++) {
            int o = a * k;
            for (int p = 0; p < k; p++) {
                double s = b[o + p] * dInv[a];
                int row = p * k;
                for (int q = 0; q < p; q++) s -= mm[row + q] * w[o + q];
                w[o + p] = s / mm[row + p];
            }
        }
        return new FactorInverse(n, k, dInv, w, logDet);
    }

    /** Number of names n. */
    @Override
    public int size() {
        return n;
    }

    /** {@code ln|C|}. */
    @Override
    public double logDeterminant() {
        return logDet;
    }

    /** {@code out = C^-1 x} (both of length n; may be the same array). O(n k). */
    public void solve(double[] x, double[] out) {
        checkLength(x, "x");
        checkLength(out, "out");
        double[] t = new double[k];
        for (int a = 0; a < n; a++) {
            double xa = x[a];
            if (xa == 0) continue;
            int o = a * k;
            for (int p = 0; p < k; p++) t[p] += w[o + p] * xa;
        }
        for (int a = 0; a < n; a++) {
            int o = a * k;
            double s = 0;
            for (int p = 0; p < k; p++) s += w[o + p] * t[p];
            out[a] = x[a] * dInv[a] - s;
        }
    }

    /** {@code x' C^-1 x}, never negative apart from rounding. O(n k). */
    @Override
    public double quadraticForm(double[] x) {
        checkLength(x, "x");
        double[] t = new double[k];
        double diag = 0;
        for (int a = 0; a < n; a++) {
            double xa = x[a];
            if (xa == 0) continue;
            diag += xa * xa * dInv[a];
            int o = a * k;
            for (int p = 0; p < k; p++) t[p] += w[o + p] * xa;
        }
        double s = 0;
        for (int p = 0; p < k; p++) s += t[p] * t[p];
        return diag - s;
    }

    /**
     * The fully invested minimum-variance portfolio {@code w = budget C^-1 1 / (1' C^-1 1)} written to
     * {@code weights}; returns its variance {@code budget^2 / (1' C^-1 1)}.
     */
    @Override
    public double minimumVariance(double budget, double[] weights) {
        checkLength(weights, "weights");
        if (!Double.isFinite(budget)) throw new IllegalArgumentException("budget must be finite, was " + budget);
        double[] ones = new double[n];
        java.util.Arrays.fill(ones, 1.0);
        solve(ones, weights);
        return CovarianceInverse.fullyInvested(budget, weights);
    }

    /**
     * The explicit inverse {@code C^-1} (n x n row-major, exactly symmetric: the lower triangle is
     * computed and mirrored), times {@code 1 / scale} (the inverse of {@code scale C}).
     */
    public double[] inverse(double scale) {
        if (!(scale > 0) || Double.isInfinite(scale)) throw new IllegalArgumentException("scale must be positive and finite, was " + scale);
        // W' (k x n) so that row a of the lower triangle is k axpys over contiguous rows of W'
        double[] wt = new double[k * n];
        for (int a = 0; a < n; a++) {
            for (int p = 0; p < k; p++) wt[p * n + a] = w[a * k + p];
        }
        double inv = 1.0 / scale;
        double[] out = new double[n * n];
        for (int a = 0; a < n; a++) {
            int row = a * n;
            int o = a * k;
            for (int p = 0; p < k; p++) Dense.axpy(-w[o + p] * inv, wt, p * n, out, row, a + 1);
            out[row + a] += dInv[a] * inv;
        }
        RiskCalculator.mirrorLowerTriangle(out, n);
        return out;
    }

    private void checkLength(double[] x, String name) {
        if (x.length != n) throw new IllegalArgumentException(name + " has length " + x.length + ", expected " + n);
    }

    /** In-place lower Cholesky factor of the k x k row-major a (upper part left untouched); false if not positive definite. */
    static boolean cholesky(double[] a, int k) {
        for (int j = 0; j < k; j++) {
            int rj = j * k;
            double s = a[rj + j];
            for (int p = 0; p < j; p++) s -= a[rj + p] * a[rj + p];
            if (!(s > 0)) return false;
            double l = Math.sqrt(s);
            a[rj + j] = l;
            for (int i = j + 1; i < k; i++) {
                int ri = i * k;
                double t = a[ri + j];
                for (int p = 0; p < j; p++) t -= a[ri + p] * a[rj + p];
                a[ri + j] = t / l;
            }
        }
        return true;
    }

    /** (L L')^-1 as a full symmetric k x k matrix, from the lower factor L stored in {@code l}. */
    private static double[] inverseFromCholesky(double[] l, int k) {
        // Linv lower triangular, then Linv' Linv
        double[] li = new double[k * k];
        for (int j = 0; j < k; j++) {
            li[j * k + j] = 1.0 / l[j * k + j];
            for (int i = j + 1; i < k; i++) {
                double s = 0;
                for (int p = j; p < i; p++) s -= l[i * k + p] * li[p * k + j];
                li[i * k + j] = s / l[i * k + i];
            }
        }
        double[] out = new double[k * k];
        for (int p = 0; p < k; p++) {
            for (int q = 0; q <= p; q++) {
                double s = 0;
                for (int r = p; r < k; r++) s += li[r * k + p] * li[r * k + q];
                out[p * k + q] = s;
                out[q * k + p] = s;
            }
        }
        return out;
    }
}
