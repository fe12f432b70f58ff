package eigencov.math;

/**
 * What EM-PCA imputation did (docs/methods.md section 7).
 *
 * @param cells           imputed cells (missing observations of admitted tickers)
 * @param iterations      EM iterations run (0 when nothing was missing)
 * @param finalChange     relative change of the imputed cells in the last iteration:
 *                        RMS(change over imputed cells) / RMS(demeaned observed values)
 * @param objectiveChange relative change of the observed-cell objective {@code sum_obs (x - x_hat)^2} (standardised,
 *                        weighted) in the last iteration, |O_j - O_j-1| / O_j; null when not measured (a single
 *                        iteration, or observed cells fitted to rounding level)
 * @param converged       whether {@code finalChange} or {@code objectiveChange} reached the tolerance before the
 *                        iteration cap
 * @param factors         number of factors the imputation used
 * @param tolerance       stopping tolerance
 * @param maxIterations   iteration cap
 */
public record ImputationReport(int cells, int iterations, double finalChange, Double objectiveChange, boolean converged,
                               int factors, double tolerance, int maxIterations) {
    /** Report for a window with no gaps. */
    public static ImputationReport none(double tolerance, int maxIterations) {
        return new ImputationReport(0, 0, 0.0, null, true, 0, tolerance, maxIterations);
    }
}
