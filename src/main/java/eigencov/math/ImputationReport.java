package eigencov.math;

/** Gap filling of one fit (temporary copy of the engine's API type). */
public record ImputationReport(int cellsImputed, int iterations, double finalRelativeChange, boolean converged) {
}
