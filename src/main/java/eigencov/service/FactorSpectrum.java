package eigencov.service;

/**
 * The factors of a fit: factor covariance F (k x k row-major, daily), and the spectrum the factor
 * count was chosen from: all non-zero eigenvalues, descending, and each one's share of the total
 * variance. Arrays are copied in and out.
 */
public record FactorSpectrum(FitRef fit, int factors, double[] factorCovariance, double[] eigenvalues,
                             double[] varianceShare) {
    public FactorSpectrum {
        if (factors < 1) throw new IllegalArgumentException("factors must be at least 1, was " + factors);
        if (factorCovariance.length != factors * factors) throw new IllegalArgumentException("factorCovariance length " + factorCovariance.length + " != " + factors + " x " + factors);
        if (eigenvalues.length != varianceShare.length) throw new IllegalArgumentException("eigenvalues " + eigenvalues.length + " != varianceShare " + varianceShare.length);
        factorCovariance = factorCovariance.clone();
        eigenvalues = eigenvalues.clone();
        varianceShare = varianceShare.clone();
    }

    @Override
    public double[] factorCovariance() {
        return factorCovariance.clone();
    }

    @Override
    public double[] eigenvalues() {
        return eigenvalues.clone();
    }

    @Override
    public double[] varianceShare() {
        return varianceShare.clone();
    }

    /** Share of the total variance the k served factors explain. */
    public double explainedShare() {
        double s = 0;
        for (int j = 0; j < Math.min(factors, varianceShare.length); j++) s += varianceShare[j];
        return s;
    }
}
