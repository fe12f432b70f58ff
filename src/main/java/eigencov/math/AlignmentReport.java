package eigencov.math;

/** Orientation of the factors against the previous fit (temporary copy of the engine's API type). */
public record AlignmentReport(boolean firstFit, int signsFlipped, int commonTickers, String note) {
}
