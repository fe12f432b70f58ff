package eigencov.math;

/**
 * What the optional rotation step did (docs/design.md section 3, "Signs": an orthogonal Procrustes
 * rotation onto the previous fit's factors, reported; docs/methods.md section 8).
 *
 * @param applied whether the factors were rotated
 * @param reason  why not, or "aligned to the previous fit"
 * @param matrix  the k x k orthogonal R (row-major) applied as B R, R' F R and f_t' R; empty when not applied.
 *                Chaining the stored R of successive fits maps factor return history onto today's factors.
 */
public record Rotation(boolean applied, String reason, double[] matrix) {
    public Rotation {
        java.util.Objects.requireNonNull(reason, "reason");
        matrix = matrix.clone();
    }

    static Rotation skipped(String reason) {
        return new Rotation(false, reason, new double[0]);
    }

    @Override
    public double[] matrix() {
        return matrix.clone();
    }
}
