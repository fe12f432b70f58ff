package eigencov.store;

import java.time.LocalDate;
import java.util.List;

/**
 * The stored model of one ok fit (table {@code fit_data}): everything a query needs without refitting.
 * Arrays are row-major as in the engine's {@code FitResult}; {@code reportsJson} holds the engine's
 * reports (factor count, imputation, alignment, exclusions, effective observations).
 */
public record FitData(List<String> universe, List<LocalDate> dates, int factors, double[] exposures, double[] factorCovariance,
                      double[] specificVariances, double[] eigenvalues, double[] varianceShare, double[] means,
                      double[] factorReturns, String reportsJson) {
    public FitData {
        universe = List.copyOf(universe);
        dates = List.copyOf(dates);
    }
}
