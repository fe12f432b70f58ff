package eigencov.math;

import java.util.Objects;

/**
 * A ticker of the window left out of the fit universe.
 *
 * @param observations observed dates of the ticker in the window
 * @param required     observations needed ({@code ceil(minCoverage * T)})
 * @param reason       {@link #COVERAGE} or {@link #ZERO_VARIANCE}
 */
public record Exclusion(String ticker, int observations, int required, String reason) {
    public static final String COVERAGE = "coverage";
    /** Correlation basis only: a constant series has no correlation. */
    public static final String ZERO_VARIANCE = "zero variance";

    public Exclusion {
        Objects.requireNonNull(ticker, "ticker");
        Objects.requireNonNull(reason, "reason");
    }
}
