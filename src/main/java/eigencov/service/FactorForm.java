package eigencov.service;

import java.util.List;

/**
 * The factor form of the answered tickers' covariance {@code B F B' + D}: exposures n x k
 * row-major (unscaled), factor covariance k x k row-major and specific variances n, both scaled to
 * {@code scale}, and each ticker's beta to the first factor (scale-free). Arrays are copied in and out.
 *
 * @param shortHistory answered tickers that are short-history names of the fit
 */
public record FactorForm(FitRef fit, List<String> tickers, List<String> omitted, List<String> shortHistory, Scale scale, int factors,
                         double[] exposures, double[] factorCovariance, double[] specificVariance, double[] betas)
        implements CovarianceAnswer {
    public FactorForm {
        tickers = List.copyOf(tickers);
        omitted = List.copyOf(omitted);
        shortHistory = List.copyOf(shortHistory);
        int n = tickers.size();
        if (factors < 1) throw new IllegalArgumentException("factors must be at least 1, was " + factors);
        if (exposures.length != n * factors) throw new IllegalArgumentException("exposures length " + exposures.length + " != " + n + " x " + factors);
        if (factorCovariance.length != factors * factors) throw new IllegalArgumentException("factorCovariance length " + factorCovariance.length + " != " + factors + " x " + factors);
        if (specificVariance.length != n) throw new IllegalArgumentException("specificVariance length " + specificVariance.length + " != " + n);
        if (betas.length != n) throw new IllegalArgumentException("betas length " + betas.length + " != " + n);
        exposures = exposures.clone();
        betas = betas.clone();
        factorCovariance = factorCovariance.clone();
        specificVariance = specificVariance.clone();
    }

    @Override
    public double[] exposures() {
        return exposures.clone();
    }

    @Override
    public double[] factorCovariance() {
        return factorCovariance.clone();
    }

    @Override
    public double[] specificVariance() {
        return specificVariance.clone();
    }

    @Override
    public double[] betas() {
        return betas.clone();
    }
}
