package eigencov.math;

import java.util.Arrays;

/**
 * Eigen-decomposition of a real symmetric n x n matrix on a flat row-major array, written for
 * speed on the T x T Gram matrices of a fit (issue 3: general-purpose Java solvers are far too
 * slow there).
 * <ol>
 * <li>Householder reduction to tridiagonal form {@code A = Q T Q'} (Golub and Van Loan, Matrix
 * Computations, 4th ed., section 8.3.1), with the symmetric rank-2 update of one step fused with the
 * matrix-vector product of the next, so each step streams the trailing block once; after the first step
 * only the upper triangle is updated (A is symmetric), which halves the traffic.</li>
 * <li>All eigenvalues of T by the implicit QL algorithm with Wilkinson-type shifts, without vectors, in
 * its root-free form (O(n^2); Bowdler, Martin, Reinsch and Wilkinson 1968; Pal-Walker-Kahan as in LAPACK
 * dsterf).</li>
 * <li>Eigenvectors of only the leading m eigenvalues, by inverse iteration on T with partial pivoting and
 * re-orthogonalisation within clusters (the scheme of LAPACK dstein), then {@code v = Q z}.</li>
 * </ol>
 * Eigenvalues are sorted descending. The input array is overwritten (it holds the reflectors).
 */
final class SymmetricEigen {

    static final double EPS = Math.ulp(1.0);
    /** Eigenvalues closer than this share of ||T|| are one cluster for re-orthogonalisation (dstein uses 1e-3). */
    private static final double CLUSTER_TOLERANCE = 1e-3;
    /** Inverse iterations per vector: with an accurate eigenvalue one step already converges; three are a margin. */
    private static final int INVERSE_ITERATIONS = 3;
    private static final int MAX_QL_ITERATIONS = 60;
    /**
     * Trailing blocks smaller than this are reduced on one thread. With the upper-triangle vector pass, a
     * step's rows cost less than handing half of them to another thread below a few hundred rows: measured
     * on this project's 2-core machine, the whole reduction took 11.5 ms serial vs 14.7-19.9 ms with
     * parallel steps from 400 or 160 rows at n = 504, and 42-50 ms vs 47-65 ms at n = 756; at n = 1260
     * parallel steps from 700 rows took 149 ms against 167-195 ms serial.
     */
    private static final int PARALLEL_MIN_ROWS = 800;
    private static final Parallel SERIAL = new Parallel(null);

    private final int n;
    private final double[] a;
    private final double[] tau;
    private final double[] diag;
    private final double[] off;
    private final double[] values;

    private SymmetricEigen(int n, double[] a, double[] tau, double[] diag, double[] off, double[] values) {
        this.n = n;
        this.a = a;
        this.tau = tau;
        this.diag = diag;
        this.off = off;
        this.values = values;
    }

    /**
     * Decomposes the symmetric matrix {@code sym} (n x n, both triangles filled). {@code sym} is
     * overwritten with the Householder vectors.
     */
    static SymmetricEigen decompose(double[] sym, int n) {
        return decompose(sym, n, SERIAL);
    }

    /** As {@link #decompose(double[], int)}, the reduction's row passes split over {@code par}. */
    static SymmetricEigen decompose(double[] sym, int n, Parallel par) {
        if (sym.length < n * n) {
            throw new IllegalArgumentException("matrix length " + sym.length + " < " + n + " x " + n);
        }
        double[] tau = new double[Math.max(n, 1)];
        double[] d = new double[n];
        double[] e = new double[n];
        tridiagonalize(sym, n, tau, d, e, par);
        double[] w = d.clone();
        double[] f = e.clone();
        qlEigenvalues(w, f, n);
        // sort descending
        Arrays.sort(w);
        for (int i = 0, j = n - 1; i < j; i++, j--) {
            double t = w[i];
            w[i] = w[j];
            w[j] = t;
        }
        return new SymmetricEigen(n, sym, tau, d, e, w);
    }

    int size() {
        return n;
    }

    /** All n eigenvalues, descending (a copy). */
    double[] eigenvalues() {
        return values.clone();
    }

    double eigenvalue(int j) {
        return values[j];
    }

    /**
     * Unit eigenvectors of the m largest eigenvalues, as the rows of an m x n row-major array
     * (row j belongs to eigenvalue j). Signs are arbitrary.
     */
    double[] leadingVectors(int m) {
        if (m < 0 || m > n) {
            throw new IllegalArgumentException("requested " + m + " eigenvectors of a " + n + " x " + n + " matrix");
        }
        double[] z = new double[m * n];
        if (m == 0) {
            return z;
        }
        tridiagonalVectors(m, z);
        backTransform(z, m);
        return z;
    }

    // ---------------------------------------------------------------- reduction

    /**
     * Householder tridiagonalisation. Step j annihilates row j beyond the superdiagonal with
     * {@code H_j = I - tau_j u u'}, u stored in row j (columns j+1..n-1, u[j+1] = 1).
     */
    static void tridiagonalize(double[] a, int n, double[] tau, double[] d, double[] e) {
        tridiagonalize(a, n, tau, d, e, SERIAL);
    }

    static void tridiagonalize(double[] a, int n, double[] tau, double[] d, double[] e, Parallel par) {
        if (n == 0) {
            return;
        }
        if (n <= 2) {
            d[0] = a[0];
            if (n == 2) {
                d[1] = a[3];
                e[0] = a[1];
            }
            return;
        }
        double[] p = new double[n];
        double[] w = new double[n];
        double[][] partial = new double[par.parts()][];
        for (int q = 1; q < partial.length; q++) {
            partial[q] = new double[n];
        }
        // reflector of row 0 and p = A22 u
        e[0] = house(a, 0, 1, n, tau, 0);
        d[0] = a[0];
        Arrays.fill(p, 0.0);
        for (int i = 1; i < n; i++) {
            double ui = a[i];
            if (ui != 0) {
                int io = i * n;
                for (int c = 1; c < n; c++) {
                    p[c] += ui * a[io + c];
                }
            }
        }
        for (int j = 0; j <= n - 3; j++) {
            int r = j + 1;
            int uo = j * n;
            double tj = tau[j];
            // w = tau p - (tau^2 / 2)(p'u) u
            double pu = 0;
            for (int c = r; c < n; c++) {
                pu += p[c] * a[uo + c];
            }
            double kk = 0.5 * tj * tj * pu;
            for (int c = r; c < n; c++) {
                w[c] = tj * p[c] - kk * a[uo + c];
            }
            // update row r (all of its trailing columns) first: it defines the next reflector
            int ro = r * n;
            double ur = a[uo + r];
            double wr = w[r];
            for (int c = r; c < n; c++) {
                a[ro + c] -= ur * w[c] + wr * a[uo + c];
            }
            d[r] = a[ro + r];
            boolean next = r <= n - 3;
            if (next) {
                e[r] = house(a, r, r + 1, n, tau, r);
                Arrays.fill(p, r + 1, n, 0.0);
            } else {
                e[r] = a[ro + r + 1];
            }
            // fused: update rows i > r (upper triangle, columns >= i) and accumulate p = A u_next
            if (par.parts() > 1 && n - r >= PARALLEL_MIN_ROWS) {
                final int jj = j;
                final boolean nx = next;
                par.forDecreasing(r + 1, n, (part, from, to) -> {
                    double[] acc = part == 0 ? p : partial[part];
                    if (part > 0) {
                        Arrays.fill(acc, r + 1, n, 0.0);
                    }
                    updateRows(a, n, jj, nx, w, acc, from, to);
                });
                for (int q = 1; q < partial.length; q++) {
                    double[] acc = partial[q];
                    for (int c = r + 1; c < n; c++) {
                        p[c] += acc[c];
                    }
                }
            } else {
                updateRows(a, n, j, next, w, p, r + 1, n);
            }
            if (!next) {
                d[n - 1] = a[(n - 1) * n + n - 1];
            }
        }
    }

    /**
     * Rows [from, to) of step j on the upper triangle (row i holds columns c >= i; the lower triangle
     * is not kept up to date after step 0): a_ic -= u_i w_c + w_i u_c, and, when {@code next},
     * p += A u_next for the symmetric A, as p_c += a_ic un_i (c >= i) and p_i += sum_{c > i} a_ic un_c,
     * with u_next stored in row j+1. Rows are independent, so slices can run on different threads,
     * each into its own p.
     */
    private static void updateRows(double[] a, int n, int j, boolean next, double[] w, double[] p, int from, int to) {
        int uo = j * n;
        int ro = (j + 1) * n;
        for (int i = from; i < to; i++) {
            int io = i * n;
            double ui = a[uo + i];
            double wi = w[i];
            double diag = Math.fma(-ui, w[i], Math.fma(-wi, a[uo + i], a[io + i]));
            a[io + i] = diag;
            double un = next ? a[ro + i] : 0;
            double dot = Kernels.VECTOR ? VectorKernels.rowPass(a, n, io, uo, ro, ui, wi, un, next, w, p, i + 1)
                    : rowPass(a, n, io, uo, ro, ui, wi, un, next, w, p, i + 1, 0);
            if (next) {
                p[i] += Math.fma(un, diag, dot);
            }
        }
    }

    /**
     * Columns [from, n) of row i's pass (scalar; also the tail of the vector pass): updates the row,
     * and when {@code next} adds un a_ic to p_c and returns {@code dot} + sum a_ic un_c.
     */
    static double rowPass(double[] a, int n, int io, int uo, int ro, double ui, double wi, double un, boolean next,
                          double[] w, double[] p, int from, double dot) {
        if (!next) {
            for (int c = from; c < n; c++) {
                a[io + c] = Math.fma(-ui, w[c], Math.fma(-wi, a[uo + c], a[io + c]));
            }
            return dot;
        }
        double s = dot;
        for (int c = from; c < n; c++) {
            double v = Math.fma(-ui, w[c], Math.fma(-wi, a[uo + c], a[io + c]));
            a[io + c] = v;
            p[c] = Math.fma(un, v, p[c]);
            s = Math.fma(v, a[ro + c], s);
        }
        return s;
    }

    /**
     * Householder vector for x = a[row, from..n-1]: on return x holds u (u[0] = 1), tau[slot] is
     * set, and the value beta of {@code H x = beta e1} is returned.
     */
    private static double house(double[] a, int row, int from, int n, double[] tau, int slot) {
        int o = row * n;
        double alpha = a[o + from];
        double scale = 0;
        for (int c = from + 1; c < n; c++) {
            scale = Math.max(scale, Math.abs(a[o + c]));
        }
        if (scale == 0) {
            tau[slot] = 0;
            a[o + from] = 1;
            return alpha;
        }
        double ss = 0;
        for (int c = from + 1; c < n; c++) {
            double x = a[o + c] / scale;
            ss += x * x;
        }
        double xnorm = scale * Math.sqrt(ss);
        double beta = -Math.copySign(pythag(alpha, xnorm), alpha);
        tau[slot] = (beta - alpha) / beta;
        double inv = 1.0 / (alpha - beta);
        for (int c = from + 1; c < n; c++) {
            a[o + c] *= inv;
        }
        a[o + from] = 1;
        return beta;
    }

    // ---------------------------------------------------------------- eigenvalues

    /**
     * Implicit QL on (d, e), e[i] coupling i and i+1; d receives the eigenvalues (unsorted); e is
     * overwritten. The root-free form of Pal, Walker and Kahan, as in the QL branch of LAPACK dsterf:
     * it iterates on the squared off-diagonal entries and needs no square root per rotation (measured
     * 3.2 ms against 5.8 ms for the rotation form, EISPACK tql1, on a 504 x 504 Gram matrix's tridiagonal,
     * eigenvalues equal to 2e-16 of lambda_1). Safeguards: an off-diagonal entry is negligible when
     * e_m^2 <= eps^2 |d_m d_m+1| (dsterf) or |e_m| <= eps ||T|| (absolute test, so a numerically zero
     * block deflates instead of iterating on rounding noise); a matrix graded with its large end at the
     * top is reversed first (QL converges from the large end; reversal is a permutation similarity, so
     * the eigenvalues are unchanged); a remaining 2 x 2 block is solved directly (LAPACK dlae2).
     */
    static void qlEigenvalues(double[] d, double[] e, int n) {
        if (n > 0) {
            e[n - 1] = 0;
        }
        if (n > 1 && Math.abs(d[0]) > Math.abs(d[n - 1])) {
            for (int i = 0, j = n - 1; i < j; i++, j--) {
                double t = d[i];
                d[i] = d[j];
                d[j] = t;
            }
            for (int i = 0, j = n - 2; i < j; i++, j--) {
                double t = e[i];
                e[i] = e[j];
                e[j] = t;
            }
        }
        double tnorm = 0;
        for (int i = 0; i < n; i++) {
            tnorm = Math.max(tnorm, Math.abs(d[i]) + Math.abs(e[i]));
        }
        double small = EPS * tnorm;
        double small2 = small * small;
        double eps2 = EPS * EPS;
        // from here on e holds the squared off-diagonal entries
        for (int i = 0; i < n; i++) {
            e[i] *= e[i];
        }
        int l = 0;
        int iter = 0;
        while (l < n) {
            int m = l;
            while (m < n - 1 && e[m] > eps2 * Math.abs(d[m] * d[m + 1]) && e[m] > small2) {
                m++;
            }
            if (m < n - 1) {
                e[m] = 0;
            }
            if (m == l) {
                l++;
                iter = 0;
                continue;
            }
            if (m == l + 1) {
                eigen2(d, l, Math.sqrt(e[l]));
                e[l] = 0;
                l += 2;
                iter = 0;
                continue;
            }
            if (iter++ == MAX_QL_ITERATIONS) {
                throw new ArithmeticException("QL iteration did not converge for eigenvalue " + l);
            }
            // shift from the leading 2 x 2 block
            double rte = Math.sqrt(e[l]);
            double sigma = (d[l + 1] - d[l]) / (2 * rte);
            double r = pythag(sigma, 1.0);
            sigma = d[l] - rte / (sigma + Math.copySign(r, sigma));
            double c = 1;
            double s = 0;
            double gamma = d[m] - sigma;
            double p = gamma * gamma;
            for (int i = m - 1; i >= l; i--) {
                double bb = e[i];
                r = p + bb;
                if (i != m - 1) {
                    e[i + 1] = s * r;
                }
                double oldc = c;
                c = p / r;
                s = bb / r;
                double oldgam = gamma;
                double alpha = d[i];
                gamma = c * (alpha - sigma) - s * oldgam;
                d[i + 1] = oldgam + (alpha - gamma);
                p = c != 0 ? gamma * gamma / c : oldc * bb;
            }
            e[l] = s * p;
            d[l] = sigma + gamma;
        }
    }

    /** Eigenvalues of [[d_l, b], [b, d_l+1]] into d_l, d_l+1 without cancellation (LAPACK dlae2). */
    private static void eigen2(double[] d, int l, double b) {
        double a = d[l];
        double c = d[l + 1];
        double sm = a + c;
        double adf = Math.abs(a - c);
        double ab = Math.abs(b + b);
        double acmx = Math.abs(a) > Math.abs(c) ? a : c;
        double acmn = Math.abs(a) > Math.abs(c) ? c : a;
        double rt = adf > ab ? adf * Math.sqrt(1 + (ab / adf) * (ab / adf))
                : adf < ab ? ab * Math.sqrt(1 + (adf / ab) * (adf / ab)) : ab * Math.sqrt(2.0);
        double rt1;
        double rt2;
        if (sm != 0) {
            rt1 = 0.5 * (sm + Math.copySign(rt, sm));
            rt2 = (acmx / rt1) * acmn - (b / rt1) * b;
        } else {
            rt1 = 0.5 * rt;
            rt2 = -0.5 * rt;
        }
        d[l] = rt1;
        d[l + 1] = rt2;
    }

    /** sqrt(a^2 + b^2) without destructive overflow; much cheaper than Math.hypot. */
    static double pythag(double a, double b) {
        double x = Math.abs(a);
        double y = Math.abs(b);
        if (x > y) {
            double q = y / x;
            return x * Math.sqrt(1.0 + q * q);
        }
        if (y == 0) {
            return 0;
        }
        double q = x / y;
        return y * Math.sqrt(1.0 + q * q);
    }

    // ---------------------------------------------------------------- vectors

    private void tridiagonalVectors(int m, double[] z) {
        double tnorm = 0;
        for (int i = 0; i < n; i++) {
            double s = Math.abs(diag[i]) + (i < n - 1 ? Math.abs(off[i]) : 0) + (i > 0 ? Math.abs(off[i - 1]) : 0);
            tnorm = Math.max(tnorm, s);
        }
        if (tnorm == 0) {
            // zero matrix: any orthonormal basis
            for (int j = 0; j < m; j++) {
                z[j * n + j] = 1;
            }
            return;
        }
        double pivmin = EPS * tnorm;
        double pertol = 10 * EPS * tnorm;
        double ortol = CLUSTER_TOLERANCE * tnorm;
        double[] dd = new double[n];
        double[] du = new double[n];
        double[] du2 = new double[n];
        double[] dl = new double[n];
        boolean[] swap = new boolean[n];
        double[] y = new double[n];
        long seed = 0x9E3779B97F4A7C15L;
        int cluster = 0;
        double shifted = 0;
        for (int j = 0; j < m; j++) {
            double lam = values[j];
            if (j > 0) {
                if (values[j - 1] - values[j] > ortol) {
                    cluster = j;
                }
                if (shifted - lam < pertol) {
                    lam = shifted - pertol;
                }
            }
            shifted = lam;
            factor(lam, pivmin, dd, du, du2, dl, swap);
            for (int i = 0; i < n; i++) {
                seed = seed * 6364136223846793005L + 1442695040888963407L;
                y[i] = ((seed >>> 11) * 0x1.0p-53) * 2 - 1;
            }
            for (int it = 0; it < INVERSE_ITERATIONS; it++) {
                double inf = 0;
                for (int i = 0; i < n; i++) {
                    inf = Math.max(inf, Math.abs(y[i]));
                }
                for (int i = 0; i < n; i++) {
                    y[i] /= inf;
                }
                solve(dd, du, du2, dl, swap, y);
                for (int q = cluster; q < j; q++) {
                    Dense.axpy(-Dense.dot(z, q * n, y, 0, n), z, q * n, y, 0, n);
                }
                double nrm = Math.sqrt(Dense.dot(y, 0, y, 0, n));
                for (int i = 0; i < n; i++) {
                    y[i] /= nrm;
                }
            }
            System.arraycopy(y, 0, z, j * n, n);
        }
    }

    /** LU with partial pivoting of T - lam I (LAPACK dgttrf layout); tiny pivots are replaced by pivmin. */
    private void factor(double lam, double pivmin, double[] dd, double[] du, double[] du2, double[] dl,
                        boolean[] swap) {
        for (int i = 0; i < n; i++) {
            dd[i] = diag[i] - lam;
            du[i] = i < n - 1 ? off[i] : 0;
            dl[i] = i < n - 1 ? off[i] : 0;
            du2[i] = 0;
            swap[i] = false;
        }
        for (int i = 0; i < n - 1; i++) {
            if (Math.abs(dd[i]) >= Math.abs(dl[i])) {
                if (Math.abs(dd[i]) < pivmin) {
                    dd[i] = Math.copySign(pivmin, dd[i]);
                }
                double fact = dl[i] / dd[i];
                dl[i] = fact;
                dd[i + 1] -= fact * du[i];
            } else {
                double fact = dd[i] / dl[i];
                dd[i] = dl[i];
                dl[i] = fact;
                double temp = du[i];
                du[i] = dd[i + 1];
                dd[i + 1] = temp - fact * dd[i + 1];
                if (i < n - 2) {
                    du2[i] = du[i + 1];
                    du[i + 1] = -fact * du[i + 1];
                }
                swap[i] = true;
            }
        }
        if (Math.abs(dd[n - 1]) < pivmin) {
            dd[n - 1] = Math.copySign(pivmin, dd[n - 1]);
        }
    }

    private void solve(double[] dd, double[] du, double[] du2, double[] dl, boolean[] swap, double[] b) {
        for (int i = 0; i < n - 1; i++) {
            if (!swap[i]) {
                b[i + 1] -= dl[i] * b[i];
            } else {
                double temp = b[i];
                b[i] = b[i + 1];
                b[i + 1] = temp - dl[i] * b[i];
            }
        }
        b[n - 1] /= dd[n - 1];
        if (n > 1) {
            b[n - 2] = (b[n - 2] - du[n - 2] * b[n - 1]) / dd[n - 2];
        }
        for (int i = n - 3; i >= 0; i--) {
            b[i] = (b[i] - du[i] * b[i + 1] - du2[i] * b[i + 2]) / dd[i];
        }
    }

    /** z (m x n, rows) <- Q z, Q = H_0 H_1 ... H_{n-3}. */
    private void backTransform(double[] z, int m) {
        for (int j = n - 3; j >= 0; j--) {
            double t = tau[j];
            if (t == 0) {
                continue;
            }
            int uo = j * n;
            int from = j + 1;
            for (int v = 0; v < m; v++) {
                int zo = v * n;
                double s = t * Dense.dot(a, uo + from, z, zo + from, n - from);
                Dense.axpy(-s, a, uo + from, z, zo + from, n - from);
            }
        }
    }
}
