package eigencov.math;

import java.time.LocalDate;
import java.util.List;

/**
 * Everything one fit produces (temporary copy of the engine's API type; the engine's version wins at merge).
 */
public record FitResult(
        FactorModel model,
        List<LocalDate> dates,
        double[] eigenvalues,
        double[] varianceShare,
        double[] means,
        double[] factorReturns,
        List<Exclusion> excluded,
        FactorCountReport factorCount,
        ImputationReport imputation,
        AlignmentReport alignment,
        double effectiveObservations,
        long computeNanos) {

    public FitResult {
        dates = List.copyOf(dates);
        excluded = List.copyOf(excluded);
        eigenvalues = eigenvalues.clone();
        varianceShare = varianceShare.clone();
        means = means.clone();
        factorReturns = factorReturns.clone();
    }

    @Override public double[] eigenvalues() { return eigenvalues.clone(); }
    @Override public double[] varianceShare() { return varianceShare.clone(); }
    @Override public double[] means() { return means.clone(); }
    @Override public double[] factorReturns() { return factorReturns.clone(); }
}
