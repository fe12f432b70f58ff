package eigencov.math;

/**
 * Decomposition of tracking error (active risk) over the union of portfolio and benchmark names.
 *
 * @param indices               model rows of the union: portfolio names in their order, then benchmark-only names
 * @param activeWeights         a = w - benchmark, aligned with indices
 * @param variance              a'Ca (scaled)
 * @param trackingError         sqrt(variance)
 * @param factorExposures       B'a
 * @param factorContributions   per factor, sum to the tracking error together with specificContributions
 * @param marginal              (Ca)_i / TE
 * @param contribution          a_i (Ca)_i / TE, summing to TE
 * @param specificContributions d_i a_i^2 / TE
 */
public record ActiveRisk(int[] indices, double[] activeWeights, double variance, double trackingError,
                         double[] factorExposures, double[] factorContributions, double[] marginal,
                         double[] contribution, double[] specificContributions) {
    public ActiveRisk {
        indices = indices.clone();
        activeWeights = activeWeights.clone();
        factorExposures = factorExposures.clone();
        factorContributions = factorContributions.clone();
        marginal = marginal.clone();
        contribution = contribution.clone();
        specificContributions = specificContributions.clone();
    }

    @Override
    public int[] indices() {
        return indices.clone();
    }

    @Override
    public double[] activeWeights() {
        return activeWeights.clone();
    }

    @Override
    public double[] factorExposures() {
        return factorExposures.clone();
    }

    @Override
    public double[] factorContributions() {
        return factorContributions.clone();
    }

    @Override
    public double[] marginal() {
        return marginal.clone();
    }

    @Override
    public double[] contribution() {
        return contribution.clone();
    }

    @Override
    public double[] specificContributions() {
        return specificContributions.clone();
    }
}
