package eigencov.math;

/**
 * Risk of one portfolio under a factor model (design.md section 3, methods.md section 9). Scaled
 * quantities (variances by {@code scale}, volatilities and contributions by its square root).
 * Temporary copy of the agreed math API; the engine's version replaces it at merge.
 */
public record PortfolioRisk(double variance, double volatility, double factorVariance, double specificVariance,
                            double[] factorExposures, double[] factorContributions,
                            double[] marginal, double[] contribution,
                            double[] specificContributions, Double trackingError, double betaToFirstFactor,
                            double[] assetBetasToFirstFactor) {
    public PortfolioRisk {
        factorExposures = factorExposures.clone();
        factorContributions = factorContributions.clone();
        marginal = marginal.clone();
        contribution = contribution.clone();
        specificContributions = specificContributions.clone();
        assetBetasToFirstFactor = assetBetasToFirstFactor.clone();
    }

    @Override public double[] factorExposures() { return factorExposures.clone(); }
    @Override public double[] factorContributions() { return factorContributions.clone(); }
    @Override public double[] marginal() { return marginal.clone(); }
    @Override public double[] contribution() { return contribution.clone(); }
    @Override public double[] specificContributions() { return specificContributions.clone(); }
    @Override public double[] assetBetasToFirstFactor() { return assetBetasToFirstFactor.clone(); }
}
