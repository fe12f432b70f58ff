package eigencov.math;

/**
 * Risk of a portfolio under a factor model (docs/design.md section 3, docs/methods.md section 9). All
 * variances and volatilities include the scale (1 = daily; 252 = annual, common practice).
 *
 * @param variance                w'Cw
 * @param volatility              sqrt(variance); 0 for a zero portfolio
 * @param factorVariance          (B'w)'F(B'w)
 * @param specificVariance        sum d_i w_i^2
 * @param factorExposures         B'w (k, unscaled)
 * @param factorContributions     x_j (F x)_j / vol per factor (scaled)
 * @param marginal                (Cw)_i / vol per asset, in idx order
 * @param contribution            w_i (Cw)_i / vol per asset; these sum to vol
 * @param specificContributions   d_i w_i^2 / vol per asset; factor plus specific contributions also sum to vol
 * @param trackingError           sqrt(a'Ca), a = w - benchmark, or null without benchmark
 * @param beta                    the portfolio's beta to the first factor, {@code sum w_i beta_i}
 * @param assetBetas              each asset's beta to the first factor, {@code (C p)_i / (p'C p)} with p the
 *                                first factor's portfolio ({@link FirstFactorBeta})
 * @param active                  decomposition of the active risk over the union of portfolio and benchmark
 *                                names, or null without benchmark
 */
public record PortfolioRisk(double variance, double volatility, double factorVariance, double specificVariance,
                            double[] factorExposures, double[] factorContributions, double[] marginal,
                            double[] contribution, double[] specificContributions, Double trackingError,
                            double beta, double[] assetBetas, ActiveRisk active) {
    public PortfolioRisk {
        factorExposures = factorExposures.clone();
        factorContributions = factorContributions.clone();
        marginal = marginal.clone();
        contribution = contribution.clone();
        specificContributions = specificContributions.clone();
        assetBetas = assetBetas.clone();
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

    @Override
    public double[] assetBetas() {
        return assetBetas.clone();
    }
}
