package eigencov.math;

/**
 * What EM-PCA imputation did (methods.md section 7).
 *
 * @param cells          imputed cells (missing observations of admitted tickers)
 * @param iterations     EM iterations run (0 when nothing was missing)
 * @param finalChange    relative change of the imputed cells in the last iteration:
 *                       RMS(change over imputed cells) / RMS(demeaned observed values)
 * @param converged      whether {@code finalChange <= tolerance} before the iteration cap
 * @param factors        number of factors the imputation used
 * @param tolerance      stopping tolerance
 * @param maxIterations  iteration cap
 */
public record ImputationReport(int cells, int iterations, double finalChange, boolean converged, int factors,
                               double tolerance, int maxIterations) {
    /** Report for a window with no gaps. */
    public static ImputationReport none(double tolerance, int maxIterations) {
        return new ImputationReport(0, 0, 0.0, true, 0, tolerance, maxIterations);
    }
}
