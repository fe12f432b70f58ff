package eigencov.math;

/**
 * The Cholesky factor {@code L L' = A} of a symmetric positive definite n x n matrix (row-major, lower
 * triangle), as the inverse of a covariance: solves, quadratic forms, log-determinant, minimum variance.
 * Row-oriented, so every inner product runs over two contiguous rows ({@link Dense#dot}).
 */
final class Cholesky implements CovarianceInverse {
    private final int n;
    private final double[] l;
    private final double logDet;

    private Cholesky(int n, double[] l, double logDet) {
        this.n = n;
        this.l = l;
        this.logDet = logDet;
    }

    /**
     * Factors {@code a} (n x n row-major, symmetric; read, not kept). Returns null when A is not
     * numerically positive definite: a pivot at or below {@code n eps max_i A_ii} (the rounding error
     * of a rank-deficient matrix's pivots), or not finite.
     */
    static Cholesky of(double[] a, int n) {
        if (a.length != (long) n * n) throw new IllegalArgumentException("a has length " + a.length + ", expected " + n + " x " + n);
        double maxDiag = 0;
        for (int i = 0; i < n; i++) maxDiag = Math.max(maxDiag, a[i * n + i]);
        double tiny = n * Math.ulp(1.0) * maxDiag;
        double[] l = new double[n * n];
        double logDet = 0;
        for (int i = 0; i < n; i++) {
            int ri = i * n;
            for (int j = 0; j < i; j++) {
                int rj = j * n;
                l[ri + j] = (a[ri + j] - Dense.dot(l, ri, l, rj, j)) / l[rj + j];
            }
            double s = a[ri + i] - Dense.dot(l, ri, l, ri, i);
            if (!(s > tiny) || Double.isInfinite(s)) return null;
            l[ri + i] = Math.sqrt(s);
            logDet += Math.log(s);
        }
        return new Cholesky(n, l, logDet);
    }

    @Override
    public int size() {
        return n;
    }

    @Override
    public double logDeterminant() {
        return logDet;
    }

    /** {@code y = L^-1 b} into {@code y} (may be b). */
    void forward(double[] b, double[] y) {
        for (int i = 0; i < n; i++) {
            int ri = i * n;
            y[i] = (b[i] - Dense.dot(l, ri, y, 0, i)) / l[ri + i];
        }
    }

    /** {@code x = A^-1 b} into {@code x} (may be b). */
    void solve(double[] b, double[] x) {
        forward(b, x);
        // L' x = y, column by column: once x_i is known, take its part out of the rows above (contiguous row i of L).
        for (int i = n - 1; i >= 0; i--) {
            int ri = i * n;
            x[i] /= l[ri + i];
            Dense.axpy(-x[i], l, ri, x, 0, i);
        }
    }

    @Override
    public double quadraticForm(double[] x) {
        if (x.length != n) throw new IllegalArgumentException("x has length " + x.length + ", expected " + n);
        double[] y = new double[n];
        forward(x, y);
        return Dense.dot(y, 0, y, 0, n);
    }

    @Override
    public double minimumVariance(double budget, double[] weights) {
        if (weights.length != n) throw new IllegalArgumentException("weights has length " + weights.length + ", expected " + n);
        java.util.Arrays.fill(weights, 1.0);
        solve(weights, weights);
        return CovarianceInverse.fullyInvested(budget, weights);
    }
}
