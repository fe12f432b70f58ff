package eigencov.math;

import java.util.Arrays;

/**
 * A factor-form covariance has no inverse: some names have zero specific variance (possible only
 * when a model's specific floor is 0). {@link #positions()} are their positions in the name set
 * the inverse was asked for.
 */
public final class SingularCovarianceException extends IllegalArgumentException {
    private static final long serialVersionUID = 1L;
    private final int[] positions;

    public SingularCovarianceException(int[] positions) {
        super("the covariance has no inverse: " + positions.length + " name(s) have zero specific variance (positions "
                + Arrays.toString(Arrays.copyOf(positions, Math.min(positions.length, 10)))
                + (positions.length > 10 ? " ..." : "") + ")");
        this.positions = positions.clone();
    }

    /** Positions (in the requested name set) of the names with zero specific variance, ascending. */
    public int[] positions() {
        return positions.clone();
    }
}
