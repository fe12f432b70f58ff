package eigencov.math;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assumptions.assumeTrue;

import java.util.Random;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

/**
 * The vector kernels against their scalar twins. The build runs the engine's tests twice (pom.xml:
 * default execution with the vector module, execution scalar-kernels without), and the first test
 * checks that each run has the kernels it was meant to test. The eigensolver's two forms are each
 * checked against EJML (EjmlOracleTest) in their own run.
 */
class KernelsTest {

    @Test
    void each_test_run_uses_the_kernels_it_was_configured_for() {
        String expected = System.getProperty("eigencov.test.kernels");
        assumeTrue(expected != null, "not run by the build");
        assertEquals("vector".equals(expected), Kernels.vectorized(), Kernels.description());
    }

    @ParameterizedTest(name = "{0} x {1}")
    @CsvSource({"3000, 504", "129, 17", "64, 8", "1, 1", "70, 250"})
    void vector_and_scalar_gram_and_dot_kernels_agree(int rows, int cols) {
        assumeTrue(Kernels.vectorized(), "scalar run");
        Random r = new Random(rows * 7L + cols);
        double[] m = new double[rows * cols];
        for (int i = 0; i < m.length; i++) {
            m[i] = r.nextGaussian();
        }
        ExecutorService pool = Executors.newFixedThreadPool(2);
        try {
            for (Parallel par : new Parallel[] {new Parallel(null), new Parallel(pool)}) {
                double[] gv = new double[cols * cols];
                double[] gs = new double[cols * cols];
                VectorKernels.crossProduct(m, rows, cols, gv, par);
                Dense.crossProductScalar(m, rows, cols, gs, par);
                for (int s = 0; s < cols; s++) {
                    double scale = Math.sqrt(gs[s * cols + s]);
                    for (int t = 0; t < cols; t++) {
                        double tol = 1e-13 * rows * scale * Math.sqrt(gs[t * cols + t]);
                        assertEquals(gs[s * cols + t], gv[s * cols + t], tol, "G " + s + "," + t);
                        assertEquals(gv[s * cols + t], gv[t * cols + s], 0.0, "symmetric");
                    }
                }
            }
            int l = Math.min(rows, 5);
            double[] cv = new double[rows * l];
            double[] cs = new double[rows * l];
            Dense.rowDotsBlock(m, cols, m, l, cv, 0, rows, 0, l, true);
            Dense.rowDotsBlock(m, cols, m, l, cs, 0, rows, 0, l, false);
            for (int x = 0; x < cv.length; x++) {
                assertEquals(cs[x], cv[x], 1e-13 * cols * (1 + Math.abs(cs[x])), "A B' " + x);
            }
        } finally {
            pool.shutdownNow();
        }
    }
}
