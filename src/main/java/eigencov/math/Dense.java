package eigencov.math;

/**
 * Dense kernels on flat row-major {@code double[]} (docs/code-style.md practice 8). Shapes are checked by
 * the callers in this package; the loops do not re-check them.
 */
final class Dense {

    /** Rows of M per cache block in {@link #crossProduct}: 64 rows of 504 doubles = 258 KB, about L2. */
    private static final int CROSS_BLOCK = 64;

    private Dense() {
    }

    /**
     * G = M' M for M (rows x cols) row-major; G (cols x cols) is overwritten, both triangles filled.
     * Computed as blocked rank-4 row updates of the lower triangle (loops the JIT vectorises),
     * the output rows split over the pool with equal triangular work.
     */
    static void crossProduct(double[] m, int rows, int cols, double[] g, Parallel par) {
        if (Kernels.VECTOR) {
            VectorKernels.crossProduct(m, rows, cols, g, par);
            return;
        }
        crossProductScalar(m, rows, cols, g, par);
    }

    /** The scalar form of {@link #crossProduct} (JVMs without the vector module; test comparisons). */
    static void crossProductScalar(double[] m, int rows, int cols, double[] g, Parallel par) {
        par.forTriangle(cols, (part, from, to) -> crossProductRows(m, rows, cols, g, from, to));
        for (int s = 0; s < cols; s++) {
            int so = s * cols;
            for (int t = 0; t < s; t++) {
                g[t * cols + s] = g[so + t];
            }
        }
    }

    /**
     * Rows [from, to) of the lower triangle, two rows of G against four rows of M at a time, with
     * Math.fma (the JIT emits vector FMAs): measured about 2x the plain rank-4 axpy form on this machine.
     */
    private static void crossProductRows(double[] m, int rows, int cols, double[] g, int from, int to) {
        for (int s = from; s < to; s++) {
            java.util.Arrays.fill(g, s * cols, s * cols + s + 1, 0.0);
        }
        for (int c0 = 0; c0 < rows; c0 += CROSS_BLOCK) {
            int c1 = Math.min(rows, c0 + CROSS_BLOCK);
            int s = from;
            for (; s + 1 < to; s += 2) {
                int go = s * cols;
                int go1 = go + cols;
                int n = s + 1;
                int c = c0;
                for (; c + 3 < c1; c += 4) {
                    int o0 = c * cols;
                    int o1 = o0 + cols;
                    int o2 = o1 + cols;
                    int o3 = o2 + cols;
                    double a0 = m[o0 + s];
                    double a1 = m[o1 + s];
                    double a2 = m[o2 + s];
                    double a3 = m[o3 + s];
                    double b0 = m[o0 + s + 1];
                    double b1 = m[o1 + s + 1];
                    double b2 = m[o2 + s + 1];
                    double b3 = m[o3 + s + 1];
                    for (int t = 0; t < n; t++) {
                        double x0 = m[o0 + t];
                        double x1 = m[o1 + t];
                        double x2 = m[o2 + t];
                        double x3 = m[o3 + t];
                        g[go + t] = Math.fma(a3, x3, Math.fma(a2, x2, Math.fma(a1, x1, Math.fma(a0, x0, g[go + t]))));
                        g[go1 + t] = Math.fma(b3, x3, Math.fma(b2, x2, Math.fma(b1, x1, Math.fma(b0, x0,
                                g[go1 + t]))));
                    }
                    g[go1 + n] = Math.fma(b3, m[o3 + n], Math.fma(b2, m[o2 + n], Math.fma(b1, m[o1 + n],
                            Math.fma(b0, m[o0 + n], g[go1 + n]))));
                }
                for (; c < c1; c++) {
                    int o0 = c * cols;
                    double a0 = m[o0 + s];
                    double b0 = m[o0 + s + 1];
                    for (int t = 0; t <= n; t++) {
                        if (t < n) {
                            g[go + t] = Math.fma(a0, m[o0 + t], g[go + t]);
                        }
                        g[go1 + t] = Math.fma(b0, m[o0 + t], g[go1 + t]);
                    }
                }
            }
            for (; s < to; s++) {
                int go = s * cols;
                for (int c = c0; c < c1; c++) {
                    int o0 = c * cols;
                    double a0 = m[o0 + s];
                    for (int t = 0; t <= s; t++) {
                        g[go + t] = Math.fma(a0, m[o0 + t], g[go + t]);
                    }
                }
            }
        }
    }

    /**
     * C = A B' for A (r x n) and B (l x n), both row-major, so C[i][c] = a_i . b_c; C (r x l) is
     * overwritten. Work is split over the longer of r and l.
     */
    static void rowDots(double[] a, int r, int n, double[] b, int l, double[] c, Parallel par) {
        if (r >= l) {
            par.forEqual(r, (part, from, to) -> rowDotsBlock(a, n, b, l, c, from, to, 0, l));
        } else {
            par.forEqual(l, (part, from, to) -> rowDotsBlock(a, n, b, l, c, 0, r, from, to));
        }
    }

    private static void rowDotsBlock(double[] a, int n, double[] b, int l, double[] c, int i0, int i1, int c0,
                                     int c1) {
        rowDotsBlock(a, n, b, l, c, i0, i1, c0, c1, Kernels.VECTOR);
    }

    /**
     * Rows [i0, i1) of A against rows [c0, c1) of B, two rows of A by two of B at a time, with the vector
     * or the scalar tile (tests compare the two).
     */
    static void rowDotsBlock(double[] a, int n, double[] b, int l, double[] c, int i0, int i1, int c0,
                                     int c1, boolean vector) {
        int i = i0;
        for (; i + 1 < i1; i += 2) {
            int ao = i * n;
            int ao1 = ao + n;
            int j = c0;
            for (; j + 1 < c1; j += 2) {
                if (vector) {
                    VectorKernels.dots2x2(a, ao, ao1, b, j * n, j * n + n, n, c, i * l + j, (i + 1) * l + j);
                } else {
                    dots2x2(a, ao, ao1, b, j * n, j * n + n, n, c, i * l + j, (i + 1) * l + j);
                }
            }
            for (; j < c1; j++) {
                c[i * l + j] = vector ? VectorKernels.dot(a, ao, b, j * n, n) : dotScalar(a, ao, b, j * n, n);
                c[(i + 1) * l + j] = vector ? VectorKernels.dot(a, ao1, b, j * n, n) : dotScalar(a, ao1, b, j * n, n);
            }
        }
        for (; i < i1; i++) {
            for (int j = c0; j < c1; j++) {
                c[i * l + j] = vector ? VectorKernels.dot(a, i * n, b, j * n, n) : dotScalar(a, i * n, b, j * n, n);
            }
        }
    }

    /** c[o0], c[o0 + 1], c[o1], c[o1 + 1] = the dot products of rows (ao, ao1) of a with rows (bo, bo1) of b. */
    private static void dots2x2(double[] a, int ao, int ao1, double[] b, int bo, int bo1, int n, double[] c, int o0,
                                int o1) {
        double s00 = 0;
        double s01 = 0;
        double s10 = 0;
        double s11 = 0;
        for (int t = 0; t < n; t++) {
            double x0 = a[ao + t];
            double x1 = a[ao1 + t];
            double y0 = b[bo + t];
            double y1 = b[bo1 + t];
            s00 += x0 * y0;
            s01 += x0 * y1;
            s10 += x1 * y0;
            s11 += x1 * y1;
        }
        c[o0] = s00;
        c[o0 + 1] = s01;
        c[o1] = s10;
        c[o1 + 1] = s11;
    }

    /**
     * C = Q M for Q (l x r) and M (r x n), row-major; C (l x n) is overwritten. Loops over the rows of
     * M once (axpy form); the pool splits M's rows and the partial sums are added.
     */
    static void leftMultiply(double[] q, int l, double[] m, int r, int n, double[] c, Parallel par) {
        int parts = Math.max(1, Math.min(par.parts(), r));
        double[][] partial = new double[parts][];
        par.forEqual(r, (part, from, to) -> {
            double[] acc = part == 0 ? c : new double[l * n];
            if (part == 0) {
                java.util.Arrays.fill(c, 0, l * n, 0.0);
            }
            if (Kernels.VECTOR) {
                VectorKernels.leftMultiplyRows(q, l, r, m, n, acc, from, to);
                partial[part] = acc;
                return;
            }
            for (int i = from; i < to; i++) {
                int mo = i * n;
                for (int j = 0; j < l; j++) {
                    double f = q[j * r + i];
                    if (f != 0) {
                        int co = j * n;
                        for (int t = 0; t < n; t++) {
                            acc[co + t] = Math.fma(f, m[mo + t], acc[co + t]);
                        }
                    }
                }
            }
            partial[part] = acc;
        });
        for (int p = 1; p < partial.length; p++) {
            double[] acc = partial[p];
            if (acc != null) {
                for (int x = 0; x < l * n; x++) {
                    c[x] += acc[x];
                }
            }
        }
    }

    static double dot(double[] a, int ao, double[] b, int bo, int n) {
        return Kernels.VECTOR ? VectorKernels.dot(a, ao, b, bo, n) : dotScalar(a, ao, b, bo, n);
    }

    /** y[yo + t] += alpha x[xo + t] for t in [0, n). */
    static void axpy(double alpha, double[] x, int xo, double[] y, int yo, int n) {
        if (Kernels.VECTOR) {
            VectorKernels.axpy(alpha, x, xo, y, yo, n);
            return;
        }
        for (int t = 0; t < n; t++) {
            y[yo + t] = Math.fma(alpha, x[xo + t], y[yo + t]);
        }
    }

    /** m[o + t] = r[t] (x[o + t] - mu) for t in [0, n) (x and m may be the same array). */
    static void centreScale(double[] x, int o, double mu, double[] r, double[] m, int n) {
        if (Kernels.VECTOR) {
            VectorKernels.centreScale(x, o, mu, r, m, n);
            return;
        }
        for (int t = 0; t < n; t++) {
            m[o + t] = r[t] * (x[o + t] - mu);
        }
    }

    /** v[o + t] *= f for t in [0, n). */
    static void scale(double[] v, int o, double f, int n) {
        if (Kernels.VECTOR) {
            VectorKernels.scale(v, o, f, n);
            return;
        }
        for (int t = 0; t < n; t++) {
            v[o + t] *= f;
        }
    }

    static double dotScalar(double[] a, int ao, double[] b, int bo, int n) {
        double s0 = 0;
        double s1 = 0;
        double s2 = 0;
        double s3 = 0;
        int t = 0;
        for (; t + 3 < n; t += 4) {
            s0 += a[ao + t] * b[bo + t];
            s1 += a[ao + t + 1] * b[bo + t + 1];
            s2 += a[ao + t + 2] * b[bo + t + 2];
            s3 += a[ao + t + 3] * b[bo + t + 3];
        }
        for (; t < n; t++) {
            s0 += a[ao + t] * b[bo + t];
        }
        return (s0 + s1) + (s2 + s3);
    }

    /** Transpose of A (r x c) into B (c x r), cache-blocked. */
    static void transpose(double[] a, int r, int c, double[] b) {
        final int blk = 32;
        for (int i0 = 0; i0 < r; i0 += blk) {
            int i1 = Math.min(r, i0 + blk);
            for (int j0 = 0; j0 < c; j0 += blk) {
                int j1 = Math.min(c, j0 + blk);
                for (int i = i0; i < i1; i++) {
                    int ao = i * c;
                    for (int j = j0; j < j1; j++) {
                        b[j * r + i] = a[ao + j];
                    }
                }
            }
        }
    }

    /**
     * Orthonormalises the l rows of V (l x n) in place by modified Gram-Schmidt, run twice
     * ("twice is enough", Giraud et al.). Rows whose norm collapses below {@code 1e-12} of their
     * original norm are replaced by zero and reported: returns the number of independent rows,
     * which are moved to the front.
     */
    static int orthonormalizeRows(double[] v, int l, int n) {
        int kept = 0;
        for (int j = 0; j < l; j++) {
            int vo = j * n;
            double before = Math.sqrt(dot(v, vo, v, vo, n));
            for (int pass = 0; pass < 2; pass++) {
                for (int p = 0; p < kept; p++) {
                    int po = p * n;
                    axpy(-dot(v, po, v, vo, n), v, po, v, vo, n);
                }
            }
            double norm = Math.sqrt(dot(v, vo, v, vo, n));
            if (before == 0 || norm <= 1e-12 * before) {
                continue;
            }
            int ko = kept * n;
            for (int t = 0; t < n; t++) {
                v[ko + t] = v[vo + t] / norm;
            }
            kept++;
        }
        java.util.Arrays.fill(v, kept * n, l * n, 0.0);
        return kept;
    }
}
