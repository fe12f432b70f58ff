package eigencov.math;

import static org.junit.jupiter.api.Assertions.assertEquals;

import java.util.Random;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

/** Optimised kernels against naive triple loops on seeded random data (docs/code-style.md practice 12c). */
class DenseTest {

    /** Sums of up to a few hundred products in a different order: relative 1e-12 of the scale. */
    static final double TOL = 1e-12;

    static ExecutorService pool;

    @BeforeAll
    static void start() {
        pool = Executors.newFixedThreadPool(2);
    }

    @AfterAll
    static void stop() {
        pool.shutdownNow();
    }

    static double[] random(int n, long seed) {
        Random r = new Random(seed);
        double[] a = new double[n];
        for (int i = 0; i < n; i++) {
            a[i] = r.nextGaussian();
        }
        return a;
    }

    @ParameterizedTest(name = "{0} x {1}")
    @CsvSource({"1, 1", "5, 3", "67, 9", "130, 66", "7, 40", "64, 16", "65, 17", "200, 33", "3, 100"})
    void kernels_match_naive_loops_single_and_pooled(int rows, int cols) {
        double[] m = random(rows * cols, rows * 31L + cols);
        for (Parallel par : new Parallel[] {new Parallel(null), new Parallel(pool)}) {
            double[] g = new double[cols * cols];
            Dense.crossProduct(m, rows, cols, g, par);
            for (int s = 0; s < cols; s++) {
                for (int t = 0; t < cols; t++) {
                    double e = 0;
                    for (int i = 0; i < rows; i++) {
                        e += m[i * cols + s] * m[i * cols + t];
                    }
                    assertEquals(e, g[s * cols + t], TOL * rows, "G " + s + "," + t);
                }
            }
            int l = 3;
            double[] b = random(l * cols, 5);
            double[] c = new double[rows * l];
            Dense.rowDots(m, rows, cols, b, l, c, par);
            double[] q = random(l * rows, 6);
            double[] lm = new double[l * cols];
            Dense.leftMultiply(q, l, m, rows, cols, lm, par);
            for (int i = 0; i < rows; i++) {
                for (int j = 0; j < l; j++) {
                    double e = 0;
                    for (int t = 0; t < cols; t++) {
                        e += m[i * cols + t] * b[j * cols + t];
                    }
                    assertEquals(e, c[i * l + j], TOL * cols, "rowDots " + i + "," + j);
                }
            }
            for (int j = 0; j < l; j++) {
                for (int t = 0; t < cols; t++) {
                    double e = 0;
                    for (int i = 0; i < rows; i++) {
                        e += q[j * rows + i] * m[i * cols + t];
                    }
                    assertEquals(e, lm[j * cols + t], TOL * rows, "leftMultiply " + j + "," + t);
                }
            }
        }
        double[] tr = new double[rows * cols];
        Dense.transpose(m, rows, cols, tr);
        for (int i = 0; i < rows; i++) {
            for (int j = 0; j < cols; j++) {
                assertEquals(m[i * cols + j], tr[j * rows + i], 0.0);
            }
        }
    }
}
