package eigencov.math;

import java.time.LocalDate;
import java.util.List;
import java.util.Objects;

/**
 * Everything one fit produced. Arrays are copied in and out.
 *
 * @param model                 the factor model to serve
 * @param dates                 window dates used (T)
 * @param eigenvalues           all non-zero eigenvalues of the decomposed matrix, descending
 * @param varianceShare         eigenvalue / total variance (trace), same length
 * @param means                 weighted mean per universe ticker
 * @param factorReturns         T x k row-major, f_t = (x_t - mu)' E after alignment (E = B for the covariance
 *                              basis; for the correlation basis the standardised returns are projected), so that
 *                              their weighted covariance is F
 * @param excluded              tickers left out and why
 * @param factorCount           rule evidence
 * @param imputation            EM imputation report
 * @param alignment             sign alignment report
 * @param effectiveObservations T_eff = (sum w)^2 / sum w^2
 * @param computeNanos          wall time from in-memory panel to finished model
 * @param rank                  numerical rank (number of eigenvalues reported)
 * @param totalVariance         trace of the decomposed matrix (sum of S_ii, or K for correlation)
 * @param basis                 basis of the fit
 */
public record FitResult(FactorModel model, List<LocalDate> dates, double[] eigenvalues, double[] varianceShare,
                        double[] means, double[] factorReturns, List<Exclusion> excluded,
                        FactorCountReport factorCount, ImputationReport imputation, AlignmentReport alignment,
                        double effectiveObservations, long computeNanos, int rank, double totalVariance,
                        Basis basis) {
    public FitResult {
        Objects.requireNonNull(model, "model");
        dates = List.copyOf(dates);
        excluded = List.copyOf(excluded);
        eigenvalues = eigenvalues.clone();
        varianceShare = varianceShare.clone();
        means = means.clone();
        factorReturns = factorReturns.clone();
        if (varianceShare.length != eigenvalues.length) {
            throw new IllegalArgumentException("varianceShare length " + varianceShare.length + " != eigenvalues "
                    + eigenvalues.length);
        }
        if (means.length != model.size()) {
            throw new IllegalArgumentException("means length " + means.length + " != universe " + model.size());
        }
        if (factorReturns.length != (long) dates.size() * model.factors()) {
            throw new IllegalArgumentException("factorReturns length " + factorReturns.length + " != T "
                    + dates.size() + " x k " + model.factors());
        }
    }

    @Override
    public double[] eigenvalues() {
        return eigenvalues.clone();
    }

    @Override
    public double[] varianceShare() {
        return varianceShare.clone();
    }

    @Override
    public double[] means() {
        return means.clone();
    }

    @Override
    public double[] factorReturns() {
        return factorReturns.clone();
    }
}
