package eigencov.math;

/**
 * Which implementation of the dense kernels this JVM runs. The vector kernels
 * ({@link VectorKernels}, JDK vector API) are used when the JVM was started with
 * {@code --add-modules jdk.incubator.vector} (the README's commands, the Dockerfile and the test
 * runs do so); otherwise the plain scalar loops of {@link Dense} and {@link SymmetricEigen} run:
 * same results within rounding, three to five times slower fits. The system property
 * {@code eigencov.kernels=scalar} forces the scalar loops (for comparison).
 */
public final class Kernels {

    static final boolean VECTOR = detect();

    private Kernels() {
    }

    private static boolean detect() {
        if ("scalar".equals(System.getProperty("eigencov.kernels"))) {
            return false;
        }
        // the Gram tile needs at least two doubles per vector (its 4 broadcast rows lie within one 2-vector panel)
        return ModuleLayer.boot().findModule("jdk.incubator.vector").isPresent() && VectorKernels.lanes() >= 2;
    }

    /** Whether the vector kernels are in use. */
    public static boolean vectorized() {
        return VECTOR;
    }

    /** One line for the startup log. */
    public static String description() {
        return VECTOR ? "vector kernels (jdk.incubator.vector, " + VectorKernels.describe() + ")"
                : "scalar kernels (start java with --add-modules jdk.incubator.vector for 3-5x faster fits)";
    }
}
