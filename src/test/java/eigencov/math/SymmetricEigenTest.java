package eigencov.math;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Arrays;
import java.util.Random;
import org.ejml.data.DMatrixRMaj;
import org.ejml.dense.row.factory.DecompositionFactory_DDRM;
import org.ejml.interfaces.decomposition.EigenDecomposition_F64;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

/** Our symmetric eigensolver against EJML's (test-scope oracle, ejml-all 0.46.1) and against invariants. */
class SymmetricEigenTest {

    /** After a decomposition, agreement relative to the largest |eigenvalue| (docs/code-style.md practice 12). */
    static final double DECOMPOSITION_TOL = 1e-11;

    static double[] randomSymmetric(int n, long seed) {
        Random r = new Random(seed);
        double[] a = new double[n * n];
        for (int i = 0; i < n; i++) {
            for (int j = 0; j <= i; j++) {
                double v = r.nextGaussian();
                a[i * n + j] = v;
                a[j * n + i] = v;
            }
        }
        return a;
    }

    /** EJML eigenvalues sorted descending. */
    static double[] ejmlEigenvalues(double[] a, int n) {
        EigenDecomposition_F64<DMatrixRMaj> eig = DecompositionFactory_DDRM.eig(n, false, true);
        assertTrue(eig.decompose(new DMatrixRMaj(n, n, true, a.clone())));
        double[] w = new double[n];
        for (int i = 0; i < n; i++) {
            w[i] = eig.getEigenvalue(i).getReal();
        }
        Arrays.sort(w);
        double[] d = new double[n];
        for (int i = 0; i < n; i++) {
            d[i] = w[n - 1 - i];
        }
        return d;
    }

    /** max_j ||A v_j - lambda_j v_j|| and max |V V' - I| for the leading m vectors. */
    static double[] residuals(double[] a, int n, SymmetricEigen eig, double[] v, int m) {
        double res = 0;
        double orth = 0;
        for (int j = 0; j < m; j++) {
            double s = 0;
            for (int i = 0; i < n; i++) {
                double av = 0;
                for (int c = 0; c < n; c++) {
                    av += a[i * n + c] * v[j * n + c];
                }
                double d = av - eig.eigenvalue(j) * v[j * n + i];
                s += d * d;
            }
            res = Math.max(res, Math.sqrt(s));
            for (int q = 0; q < m; q++) {
                double dot = Dense.dot(v, j * n, v, q * n, n);
                orth = Math.max(orth, Math.abs(dot - (j == q ? 1 : 0)));
            }
        }
        return new double[] {res, orth};
    }

    static double maxAbs(double[] x) {
        double m = 0;
        for (double v : x) {
            m = Math.max(m, Math.abs(v));
        }
        return m;
    }

    @ParameterizedTest
    @ValueSource(ints = {1, 2, 3, 4, 7, 31, 100, 157})
    void eigenvalues_and_vectors_agree_with_ejml_on_random_symmetric_matrices(int n) {
        double[] a = randomSymmetric(n, 1000 + n);
        double[] expected = ejmlEigenvalues(a, n);
        SymmetricEigen eig = SymmetricEigen.decompose(a.clone(), n);
        double scale = maxAbs(expected);
        for (int i = 0; i < n; i++) {
            assertEquals(expected[i], eig.eigenvalue(i), DECOMPOSITION_TOL * scale, "eigenvalue " + i);
        }
        int m = Math.min(n, 12);
        double[] v = eig.leadingVectors(m);
        double[] r = residuals(a, n, eig, v, m);
        assertTrue(r[0] < DECOMPOSITION_TOL * scale * n, "residual " + r[0]);
        assertTrue(r[1] < 1e-12 * n, "orthogonality " + r[1]);
    }

    @Test
    void reduction_split_over_a_pool_gives_the_serial_result() {
        int n = 860; // the first 60 steps have more trailing rows than the 800 from which passes are split
        double[] a = randomSymmetric(n, 77);
        java.util.concurrent.ExecutorService pool = java.util.concurrent.Executors.newFixedThreadPool(2);
        try {
            SymmetricEigen serial = SymmetricEigen.decompose(a.clone(), n);
            SymmetricEigen pooled = SymmetricEigen.decompose(a.clone(), n, new Parallel(pool));
            double[] expected = ejmlEigenvalues(a, n);
            for (int i = 0; i < n; i++) {
                assertEquals(expected[i], pooled.eigenvalue(i), DECOMPOSITION_TOL * maxAbs(expected), "eigenvalue " + i);
                assertEquals(serial.eigenvalue(i), pooled.eigenvalue(i), DECOMPOSITION_TOL * maxAbs(expected));
            }
            double[] r = residuals(a, n, pooled, pooled.leadingVectors(5), 5);
            assertTrue(r[0] < DECOMPOSITION_TOL * maxAbs(expected) * n && r[1] < 1e-12 * n, Arrays.toString(r));
        } finally {
            pool.shutdownNow();
        }
    }

    /**
     * Closed form: the n x n tridiagonal Toeplitz matrix with diagonal a and off-diagonal b has the
     * eigenvalues a + 2 b cos(j pi / (n + 1)), j = 1..n (a standard result, e.g. G. D. Smith, Numerical
     * Solution of Partial Differential Equations, from memory). A block diagonal of such blocks (zero
     * couplings between them), including 1 x 1 and 2 x 2 blocks, checks the deflation paths of the QL
     * iteration; a graded diagonal checks the reversal.
     */
    @ParameterizedTest
    @ValueSource(ints = {1, 2, 3, 7, 50, 301})
    void ql_eigenvalues_match_the_closed_form_of_tridiagonal_toeplitz_blocks(int n) {
        int[] sizes = {n, 1, 2, n, 2};
        int total = Arrays.stream(sizes).sum();
        double[] d = new double[total];
        double[] e = new double[total];
        double[] expected = new double[total];
        int o = 0;
        for (int b = 0; b < sizes.length; b++) {
            double diag = 1.5 + b;
            double off = b % 2 == 0 ? -0.7 : 0.4;
            for (int i = 0; i < sizes[b]; i++) {
                d[o + i] = diag;
                e[o + i] = i < sizes[b] - 1 ? off : 0;
                expected[o + i] = diag + 2 * off * Math.cos((i + 1) * Math.PI / (sizes[b] + 1));
            }
            o += sizes[b];
        }
        double[] w = d.clone();
        SymmetricEigen.qlEigenvalues(w, e.clone(), total);
        Arrays.sort(w);
        Arrays.sort(expected);
        for (int i = 0; i < total; i++) {
            assertEquals(expected[i], w[i], 1e-14 * (2 + sizes.length), "eigenvalue " + i);
        }
        // graded: the same spectrum scaled by 10^6 at the top and 1 at the bottom is reversed first
        double[] g = new double[total];
        double[] ge = new double[total];
        for (int i = 0; i < total; i++) {
            g[i] = Math.pow(10, 6.0 * (total - 1 - i) / Math.max(1, total - 1));
        }
        double[] dense = new double[total * total];
        for (int i = 0; i < total; i++) {
            dense[i * total + i] = g[i];
            if (i < total - 1) {
                ge[i] = 1e-3 * Math.sqrt(g[i] * g[i + 1]);
                dense[i * total + i + 1] = ge[i];
                dense[(i + 1) * total + i] = ge[i];
            }
        }
        double[] wg = g.clone();
        SymmetricEigen.qlEigenvalues(wg, ge.clone(), total);
        Arrays.sort(wg);
        double[] ej = ejmlEigenvalues(dense, total);
        for (int i = 0; i < total; i++) {
            assertEquals(ej[total - 1 - i], wg[i], 1e-13 * Math.abs(ej[total - 1 - i]) + 1e-15 * ej[0],
                    "graded eigenvalue " + i);
        }
    }

    @ParameterizedTest
    @ValueSource(ints = {1, 2, 3, 5, 8, 13, 21, 34})
    void gram_matrices_of_exactly_low_rank_data_converge_and_match_ejml(int seed) {
        // a numerically zero block of rounding noise below a few large eigenvalues: the graded case that
        // makes plain QL iterate on noise
        Random r = new Random(seed);
        int n = 40 + 20 * (seed % 8);
        int rank = 1 + seed % 7;
        int cols = 3 * n;
        double[] f = new double[n * rank];
        double[] l = new double[cols * rank];
        for (int x = 0; x < f.length; x++) {
            f[x] = r.nextGaussian() * 100;
        }
        for (int x = 0; x < l.length; x++) {
            l[x] = r.nextGaussian();
        }
        double[] m = new double[cols * n];
        for (int i = 0; i < cols; i++) {
            for (int t = 0; t < n; t++) {
                double s = 0;
                for (int c = 0; c < rank; c++) {
                    s += l[i * rank + c] * f[t * rank + c];
                }
                m[i * n + t] = s;
            }
        }
        double[] g = new double[n * n];
        Dense.crossProduct(m, cols, n, g, new Parallel(null));
        double[] expected = ejmlEigenvalues(g, n);
        boolean reversed = seed % 2 == 0;
        if (reversed) {
            // same spectrum with the large end at the bottom: permute rows and columns
            double[] p = new double[n * n];
            for (int i = 0; i < n; i++) {
                for (int j = 0; j < n; j++) {
                    p[i * n + j] = g[(n - 1 - i) * n + (n - 1 - j)];
                }
            }
            g = p;
        }
        SymmetricEigen eig = SymmetricEigen.decompose(g.clone(), n);
        for (int i = 0; i < n; i++) {
            assertEquals(expected[i], eig.eigenvalue(i), 1e-13 * n * expected[0], "eigenvalue " + i);
        }
        double[] res = residuals(g, n, eig, eig.leadingVectors(rank), rank);
        assertTrue(res[0] < 1e-13 * n * expected[0] && res[1] < 1e-12, Arrays.toString(res));
    }

    @Test
    void repeated_and_clustered_eigenvalues_give_orthonormal_vectors() {
        // A = Q diag(5,5,5,2,2,1e-14,0,...) Q' with a random orthogonal Q: exact clusters
        int n = 40;
        double[] lam = new double[n];
        lam[0] = 5;
        lam[1] = 5;
        lam[2] = 5;
        lam[3] = 2;
        lam[4] = 2 + 1e-13;
        lam[5] = 1e-14;
        double[] q = randomSymmetric(n, 7);
        Dense.orthonormalizeRows(q, n, n);
        double[] a = new double[n * n];
        for (int i = 0; i < n; i++) {
            for (int j = 0; j < n; j++) {
                double s = 0;
                for (int c = 0; c < n; c++) {
                    s += q[c * n + i] * lam[c] * q[c * n + j];
                }
                a[i * n + j] = s;
            }
        }
        for (int i = 0; i < n; i++) {
            for (int j = 0; j < i; j++) {
                a[i * n + j] = a[j * n + i];
            }
        }
        SymmetricEigen eig = SymmetricEigen.decompose(a.clone(), n);
        for (int i = 0; i < 6; i++) {
            assertEquals(lam[i], eig.eigenvalue(i), 1e-13 * 5, "eigenvalue " + i);
        }
        double[] v = eig.leadingVectors(6);
        double[] r = residuals(a, n, eig, v, 6);
        assertTrue(r[0] < 1e-12 * 5, "residual " + r[0]);
        assertTrue(r[1] < 1e-12, "orthogonality " + r[1]);
    }

    @Test
    void diagonal_and_zero_matrices_are_handled() {
        int n = 5;
        double[] a = new double[n * n];
        a[0] = 1;
        a[6] = 3;
        a[12] = 3;
        a[18] = -2;
        SymmetricEigen eig = SymmetricEigen.decompose(a.clone(), n);
        assertEquals(3, eig.eigenvalue(0), 0);
        assertEquals(3, eig.eigenvalue(1), 0);
        assertEquals(-2, eig.eigenvalue(4), 0);
        double[] r = residuals(a, n, eig, eig.leadingVectors(3), 3);
        assertTrue(r[0] < 1e-14 && r[1] < 1e-14, Arrays.toString(r));
        SymmetricEigen zero = SymmetricEigen.decompose(new double[9], 3);
        assertEquals(0, zero.eigenvalue(0), 0);
        double[] r0 = residuals(new double[9], 3, zero, zero.leadingVectors(3), 3);
        assertTrue(r0[1] < 1e-15);
    }
}
