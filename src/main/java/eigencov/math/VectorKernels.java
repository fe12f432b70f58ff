package eigencov.math;

import java.util.Arrays;
import jdk.incubator.vector.DoubleVector;
import jdk.incubator.vector.VectorOperators;
import jdk.incubator.vector.VectorSpecies;

/**
 * The hot kernels of {@link Dense} and {@link SymmetricEigen} written with the JDK's vector API
 * ({@code jdk.incubator.vector}, JEP 414 in Java 17). Only loaded when {@link Kernels#vectorized()}:
 * the JVM was started with {@code --add-modules jdk.incubator.vector}.
 *
 * <p>Why not rely on the JIT's own vectorisation: C2 (17 and 25 alike) vectorises {@code y[i] += a * x[i]}
 * only when both arrays are indexed by the same expression; with row offsets ({@code y[yo + i]},
 * {@code x[xo + i]}), as in every kernel here, it emits scalar code (measured on this project's 2-core
 * AVX-512 machine: 3 FMA/ns scalar against 15 FMA/ns for the same axpy with the vector API), and it
 * never vectorises a floating-point dot product. The Gram product below, a register-tiled kernel on
 * packed panels, took 13 ms on one thread at 504 x 3000 where the best scalar form took 60 ms.
 *
 * <p>Every method computes the same quantity as its scalar twin in {@link Dense} or
 * {@link SymmetricEigen}; only the order of additions (lane partial sums) differs, within rounding.
 */
final class VectorKernels {

    private static final VectorSpecies<Double> S = DoubleVector.SPECIES_PREFERRED;
    private static final int L = S.length();
    /** Columns of a Gram tile: two vectors. */
    private static final int NR = 2 * L;
    /** Rows of a Gram tile (broadcast values); must divide NR. */
    private static final int MR = 4;
    /**
     * Rows of M per packed block: 64 rows x 512 padded columns = 256 KB of panels, which stay in L2 while
     * every tile of the block reads them (measured 13.4 ms at 64, 19-21 ms at 128-512 rows, 504 x 3000).
     */
    private static final int KC = 64;

    private VectorKernels() {
    }

    static int lanes() {
        return L;
    }

    static String describe() {
        return S.vectorBitSize() + "-bit, " + L + " doubles per vector";
    }

    // ---------------------------------------------------------------- Gram matrix

    /**
     * G = M' M for M (rows x cols) row-major; G (cols x cols) overwritten, both triangles filled.
     * Blocks of {@value #KC} rows of M are packed into column panels of NR doubles and multiplied by a
     * 4 x NR register tile (8 vector accumulators); the blocks are split over the pool, each part
     * summing into its own padded accumulator, and the parts are added at the end.
     */
    static void crossProduct(double[] m, int rows, int cols, double[] g, Parallel par) {
        int tp = (cols + NR - 1) / NR * NR;
        int blocks = (rows + KC - 1) / KC;
        int parts = Math.max(1, Math.min(par.parts(), blocks));
        double[][] acc = new double[parts][];
        par.forRange(0, blocks, (part, from, to) -> {
            double[] gp = new double[tp * tp];
            double[] panel = new double[KC * tp];
            for (int b = from; b < to; b++) {
                int c0 = b * KC;
                gramBlock(m, cols, c0, Math.min(rows, c0 + KC), panel, gp, tp);
            }
            acc[part] = gp;
        });
        double[] first = acc[0];
        for (int s = 0; s < cols; s++) {
            int so = s * tp;
            int go = s * cols;
            for (int t = 0; t <= s; t++) {
                double v = first[so + t];
                for (int p = 1; p < acc.length; p++) {
                    if (acc[p] != null) {
                        v += acc[p][so + t];
                    }
                }
                g[go + t] = v;
                g[t * cols + s] = v;
            }
        }
    }

    /** Lower-triangle tiles of gp (tp x tp) += B'B for the rows [c0, c1) of m. */
    private static void gramBlock(double[] m, int cols, int c0, int c1, double[] p, double[] gp, int tp) {
        int kc = c1 - c0;
        int panels = tp / NR;
        for (int q = 0; q < panels; q++) {
            int po = q * kc * NR;
            int t0 = q * NR;
            int w = Math.min(NR, cols - t0);
            for (int c = 0; c < kc; c++) {
                System.arraycopy(m, (c0 + c) * cols + t0, p, po + c * NR, w);
                if (w < NR) {
                    Arrays.fill(p, po + c * NR + w, po + c * NR + NR, 0.0);
                }
            }
        }
        for (int s0 = 0; s0 < cols; s0 += MR) {
            int sq = s0 / NR;
            int ao = sq * kc * NR + s0 % NR;
            for (int q = 0; q <= sq; q++) {
                gramTile(p, ao, q * kc * NR, kc, gp, s0 * tp + q * NR, tp);
            }
        }
    }

    /** gp[4 rows from go, NR columns] += sum_c p[ao + c NR + i] * p[bo + c NR + j]. */
    private static void gramTile(double[] p, int ao, int bo, int kc, double[] gp, int go, int tp) {
        DoubleVector c00 = DoubleVector.zero(S);
        DoubleVector c01 = c00;
        DoubleVector c10 = c00;
        DoubleVector c11 = c00;
        DoubleVector c20 = c00;
        DoubleVector c21 = c00;
        DoubleVector c30 = c00;
        DoubleVector c31 = c00;
        for (int c = 0; c < kc; c++) {
            int b = bo + c * NR;
            DoubleVector x0 = DoubleVector.fromArray(S, p, b);
            DoubleVector x1 = DoubleVector.fromArray(S, p, b + L);
            int a = ao + c * NR;
            DoubleVector a0 = DoubleVector.broadcast(S, p[a]);
            c00 = x0.fma(a0, c00);
            c01 = x1.fma(a0, c01);
            DoubleVector a1 = DoubleVector.broadcast(S, p[a + 1]);
            c10 = x0.fma(a1, c10);
            c11 = x1.fma(a1, c11);
            DoubleVector a2 = DoubleVector.broadcast(S, p[a + 2]);
            c20 = x0.fma(a2, c20);
            c21 = x1.fma(a2, c21);
            DoubleVector a3 = DoubleVector.broadcast(S, p[a + 3]);
            c30 = x0.fma(a3, c30);
            c31 = x1.fma(a3, c31);
        }
        int g = go;
        c00.add(DoubleVector.fromArray(S, gp, g)).intoArray(gp, g);
        c01.add(DoubleVector.fromArray(S, gp, g + L)).intoArray(gp, g + L);
        g += tp;
        c10.add(DoubleVector.fromArray(S, gp, g)).intoArray(gp, g);
        c11.add(DoubleVector.fromArray(S, gp, g + L)).intoArray(gp, g + L);
        g += tp;
        c20.add(DoubleVector.fromArray(S, gp, g)).intoArray(gp, g);
        c21.add(DoubleVector.fromArray(S, gp, g + L)).intoArray(gp, g + L);
        g += tp;
        c30.add(DoubleVector.fromArray(S, gp, g)).intoArray(gp, g);
        c31.add(DoubleVector.fromArray(S, gp, g + L)).intoArray(gp, g + L);
    }

    // ---------------------------------------------------------------- level-1 and level-2 helpers

    /** sum_t a[ao + t] b[bo + t]. */
    static double dot(double[] a, int ao, double[] b, int bo, int n) {
        DoubleVector s0 = DoubleVector.zero(S);
        DoubleVector s1 = s0;
        int t = 0;
        int bound2 = n - 2 * L;
        for (; t <= bound2; t += 2 * L) {
            s0 = DoubleVector.fromArray(S, a, ao + t).fma(DoubleVector.fromArray(S, b, bo + t), s0);
            s1 = DoubleVector.fromArray(S, a, ao + t + L).fma(DoubleVector.fromArray(S, b, bo + t + L), s1);
        }
        double s = s0.add(s1).reduceLanes(VectorOperators.ADD);
        for (; t < n; t++) {
            s = Math.fma(a[ao + t], b[bo + t], s);
        }
        return s;
    }

    /** y[yo + t] += alpha x[xo + t], t in [0, n). */
    static void axpy(double alpha, double[] x, int xo, double[] y, int yo, int n) {
        DoubleVector va = DoubleVector.broadcast(S, alpha);
        int t = 0;
        int bound = n - L;
        for (; t <= bound; t += L) {
            DoubleVector.fromArray(S, x, xo + t).fma(va, DoubleVector.fromArray(S, y, yo + t)).intoArray(y, yo + t);
        }
        for (; t < n; t++) {
            y[yo + t] = Math.fma(alpha, x[xo + t], y[yo + t]);
        }
    }

    /** m[o + t] = r[t] (x[o + t] - mu). */
    static void centreScale(double[] x, int o, double mu, double[] r, double[] m, int n) {
        DoubleVector vmu = DoubleVector.broadcast(S, mu);
        int t = 0;
        int bound = n - L;
        for (; t <= bound; t += L) {
            DoubleVector.fromArray(S, x, o + t).sub(vmu).mul(DoubleVector.fromArray(S, r, t)).intoArray(m, o + t);
        }
        for (; t < n; t++) {
            m[o + t] = r[t] * (x[o + t] - mu);
        }
    }

    /** v[o + t] *= f. */
    static void scale(double[] v, int o, double f, int n) {
        DoubleVector vf = DoubleVector.broadcast(S, f);
        int t = 0;
        int bound = n - L;
        for (; t <= bound; t += L) {
            DoubleVector.fromArray(S, v, o + t).mul(vf).intoArray(v, o + t);
        }
        for (; t < n; t++) {
            v[o + t] *= f;
        }
    }

    /**
     * c[o0], c[o0 + 1], c[o1], c[o1 + 1] = the dot products of rows (ao, ao1) of a with rows (bo, bo1) of b.
     * The tile of {@link Dense#rowDots}; a method of its own, called once per pair of pairs, so that C2
     * compiles it whole and keeps the accumulators in registers (a loop first compiled by on-stack
     * replacement boxes live vectors).
     */
    static void dots2x2(double[] a, int ao, int ao1, double[] b, int bo, int bo1, int n, double[] c, int o0,
                                int o1) {
        DoubleVector s00 = DoubleVector.zero(S);
        DoubleVector s01 = s00;
        DoubleVector s10 = s00;
        DoubleVector s11 = s00;
        int t = 0;
        int bound = n - L;
        for (; t <= bound; t += L) {
            DoubleVector x0 = DoubleVector.fromArray(S, a, ao + t);
            DoubleVector x1 = DoubleVector.fromArray(S, a, ao1 + t);
            DoubleVector y0 = DoubleVector.fromArray(S, b, bo + t);
            DoubleVector y1 = DoubleVector.fromArray(S, b, bo1 + t);
            s00 = x0.fma(y0, s00);
            s01 = x0.fma(y1, s01);
            s10 = x1.fma(y0, s10);
            s11 = x1.fma(y1, s11);
        }
        double r00 = s00.reduceLanes(VectorOperators.ADD);
        double r01 = s01.reduceLanes(VectorOperators.ADD);
        double r10 = s10.reduceLanes(VectorOperators.ADD);
        double r11 = s11.reduceLanes(VectorOperators.ADD);
        for (; t < n; t++) {
            double x0 = a[ao + t];
            double x1 = a[ao1 + t];
            double y0 = b[bo + t];
            double y1 = b[bo1 + t];
            r00 = Math.fma(x0, y0, r00);
            r01 = Math.fma(x0, y1, r01);
            r10 = Math.fma(x1, y0, r10);
            r11 = Math.fma(x1, y1, r11);
        }
        c[o0] = r00;
        c[o0 + 1] = r01;
        c[o1] = r10;
        c[o1 + 1] = r11;
    }

    /**
     * acc (l x n) += Q[:, from..to) M[from..to, :] for Q (l x r) and M (r x n): each row of M is loaded
     * once per four rows of the output (four axpys sharing the load).
     */
    static void leftMultiplyRows(double[] q, int l, int r, double[] m, int n, double[] acc, int from, int to) {
        for (int i = from; i < to; i++) {
            int mo = i * n;
            int j = 0;
            for (; j + 3 < l; j += 4) {
                double f0 = q[j * r + i];
                double f1 = q[(j + 1) * r + i];
                double f2 = q[(j + 2) * r + i];
                double f3 = q[(j + 3) * r + i];
                axpy4(f0, f1, f2, f3, m, mo, acc, j * n, n);
            }
            for (; j < l; j++) {
                double f = q[j * r + i];
                if (f != 0) {
                    axpy(f, m, mo, acc, j * n, n);
                }
            }
        }
    }

    /** acc rows at o, o + n, o + 2n, o + 3n += f0..f3 times m[mo .. mo + n): one load of m for four axpys. */
    private static void axpy4(double f0, double f1, double f2, double f3, double[] m, int mo, double[] acc, int o,
                              int n) {
        int o1 = o + n;
        int o2 = o1 + n;
        int o3 = o2 + n;
        DoubleVector v0 = DoubleVector.broadcast(S, f0);
        DoubleVector v1 = DoubleVector.broadcast(S, f1);
        DoubleVector v2 = DoubleVector.broadcast(S, f2);
        DoubleVector v3 = DoubleVector.broadcast(S, f3);
        int t = 0;
        int bound = n - L;
        for (; t <= bound; t += L) {
            DoubleVector x = DoubleVector.fromArray(S, m, mo + t);
            x.fma(v0, DoubleVector.fromArray(S, acc, o + t)).intoArray(acc, o + t);
            x.fma(v1, DoubleVector.fromArray(S, acc, o1 + t)).intoArray(acc, o1 + t);
            x.fma(v2, DoubleVector.fromArray(S, acc, o2 + t)).intoArray(acc, o2 + t);
            x.fma(v3, DoubleVector.fromArray(S, acc, o3 + t)).intoArray(acc, o3 + t);
        }
        for (; t < n; t++) {
            double x = m[mo + t];
            acc[o + t] = Math.fma(f0, x, acc[o + t]);
            acc[o1 + t] = Math.fma(f1, x, acc[o1 + t]);
            acc[o2 + t] = Math.fma(f2, x, acc[o2 + t]);
            acc[o3 + t] = Math.fma(f3, x, acc[o3 + t]);
        }
    }

    /**
     * Columns [from, n) of row i's pass of the Householder reduction (see {@link SymmetricEigen#rowPass}):
     * the same fused multiply-adds per element, the dot product summed lane-wise.
     */
    static double rowPass(double[] a, int n, int io, int uo, int ro, double ui, double wi, double un, boolean next,
                          double[] w, double[] p, int from) {
        DoubleVector mui = DoubleVector.broadcast(S, -ui);
        DoubleVector mwi = DoubleVector.broadcast(S, -wi);
        int c = from;
        int bound = n - L;
        if (!next) {
            for (; c <= bound; c += L) {
                DoubleVector.fromArray(S, w, c).fma(mui,
                        DoubleVector.fromArray(S, a, uo + c).fma(mwi, DoubleVector.fromArray(S, a, io + c)))
                        .intoArray(a, io + c);
            }
            return SymmetricEigen.rowPass(a, n, io, uo, ro, ui, wi, un, false, w, p, c, 0);
        }
        DoubleVector vun = DoubleVector.broadcast(S, un);
        DoubleVector acc = DoubleVector.zero(S);
        for (; c <= bound; c += L) {
            DoubleVector v = DoubleVector.fromArray(S, w, c).fma(mui,
                    DoubleVector.fromArray(S, a, uo + c).fma(mwi, DoubleVector.fromArray(S, a, io + c)));
            v.intoArray(a, io + c);
            v.fma(vun, DoubleVector.fromArray(S, p, c)).intoArray(p, c);
            acc = v.fma(DoubleVector.fromArray(S, a, ro + c), acc);
        }
        return SymmetricEigen.rowPass(a, n, io, uo, ro, ui, wi, un, true, w, p, c,
                acc.reduceLanes(VectorOperators.ADD));
    }
}
