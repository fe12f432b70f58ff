package eigencov.store;

import eigencov.math.ShortHistory;

import java.time.LocalDate;
import java.util.List;

/**
 * The stored model of one ok fit (table {@code fit_data}): everything a query needs without refitting.
 * Arrays are row-major as in the engine's {@code FitResult}; {@code reportsJson} holds the engine's
 * reports (factor count, imputation, alignment, exclusions, effective observations).
 *
 * @param variances    the universe's S_ii, or null for a fit stored before they were kept
 * @param shortHistory names served beside the universe ({@link ShortHistory#NONE} for none, and for fits
 *                     stored before they existed)
 */
public record FitData(List<String> universe, List<LocalDate> dates, int factors, double[] exposures, double[] factorCovariance,
                      double[] specificVariances, double[] eigenvalues, double[] varianceShare, double[] means,
                      double[] factorReturns, String reportsJson, double[] variances, ShortHistory shortHistory) {
    public FitData {
        universe = List.copyOf(universe);
        dates = List.copyOf(dates);
        if (shortHistory == null) shortHistory = ShortHistory.NONE;
    }
}
