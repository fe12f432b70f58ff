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
 * @param variances             weighted variance S_ii of each universe ticker over the window (gaps imputed), the
 *                              sigma_i^2 of the correlation basis
 * @param shortHistory          names served beside the universe ({@link ShortHistoryFit}); {@link ShortHistory#NONE}
 *                              when the option is off. {@link #model()} is the universe's model; {@link #servedModel()}
 *                              adds these names.
 */
public record FitResult(FactorModel model, List<LocalDate> dates, double[] eigenvalues, double[] varianceShare,
                        double[] means, double[] factorReturns, List<Exclusion> excluded,
                        FactorCountReport factorCount, ImputationReport imputation, AlignmentReport alignment,
                        double effectiveObservations, long computeNanos, int rank, double totalVariance,
                        Basis basis, double[] variances, ShortHistory shortHistory) {
    public FitResult {
        Objects.requireNonNull(model, "model");
        Objects.requireNonNull(shortHistory, "shortHistory");
        dates = List.copyOf(dates);
        excluded = List.copyOf(excluded);
        eigenvalues = eigenvalues.clone();
        varianceShare = varianceShare.clone();
        means = means.clone();
        factorReturns = factorReturns.clone();
        variances = variances.clone();
        if (variances.length != model.size()) {
            throw new IllegalArgumentException("variances length " + variances.length + " != universe " + model.size());
        }
        if (shortHistory.size() > 0) {
            if (shortHistory.factors() != model.factors()) {
                throw new IllegalArgumentException("short-history names have " + shortHistory.factors() + " factors, the model "
                        + model.factors());
            }
            for (String t : shortHistory.tickers()) {
                if (model.indexOf(t) >= 0) {
                    throw new IllegalArgumentException("'" + t + "' is both in the universe and a short-history name");
                }
            }
        }
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

    /**
     * A fit without short-history names whose variances are not known (stored before they were kept): the model's
     * diagonal {@code C_ii} stands in for S_ii, equal to it wherever the specific floor is inactive.
     */
    public FitResult(FactorModel model, List<LocalDate> dates, double[] eigenvalues, double[] varianceShare,
                     double[] means, double[] factorReturns, List<Exclusion> excluded,
                     FactorCountReport factorCount, ImputationReport imputation, AlignmentReport alignment,
                     double effectiveObservations, long computeNanos, int rank, double totalVariance, Basis basis) {
        this(model, dates, eigenvalues, varianceShare, means, factorReturns, excluded, factorCount, imputation, alignment,
                effectiveObservations, computeNanos, rank, totalVariance, basis, model.diagonal(), ShortHistory.NONE);
    }

    /**
     * This fit with short-history names added: {@code excluded} replaces the exclusions (the names now served
     * leave it), and {@code extraNanos} is added to the compute time.
     */
    public FitResult withShortHistory(ShortHistory names, List<Exclusion> excluded, long extraNanos) {
        return new FitResult(model, dates, eigenvalues, varianceShare, means, factorReturns, excluded, factorCount,
                imputation, alignment, effectiveObservations, computeNanos + extraNanos, rank, totalVariance, basis,
                variances, names);
    }

    /**
     * The model queries are answered from: the universe's rows, then one row per short-history name
     * (same factor covariance). The universe's model itself when there are none. Builds a new model
     * each call: callers keep it (the service's served fit does).
     */
    public FactorModel servedModel() {
        return shortHistory.size() == 0 ? model
                : model.withRows(shortHistory.tickers(), shortHistory.exposures(), shortHistory.specificVariances());
    }

    @Override
    public double[] variances() {
        return variances.clone();
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
