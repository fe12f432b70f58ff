package eigencov.service;

import eigencov.math.PortfolioRisk;

import java.util.List;

/**
 * Risk of a portfolio: the answered tickers and weights (request order, omitted ones removed) and
 * the engine's {@link PortfolioRisk}, whose per-asset arrays follow {@code tickers}. With a
 * benchmark, {@code activeTickers} names the rows of the active-risk decomposition
 * ({@link PortfolioRisk#active()}: portfolio names, then benchmark-only names); otherwise it is empty.
 * {@code shortHistory} names the answered tickers (portfolio or benchmark) that are short-history names of the fit.
 */
public record RiskAnswer(FitRef fit, Scale scale, List<String> tickers, double[] weights, List<String> omitted,
                         PortfolioRisk risk, List<String> activeTickers, List<String> shortHistory) {
    public RiskAnswer {
        tickers = List.copyOf(tickers);
        omitted = List.copyOf(omitted);
        shortHistory = List.copyOf(shortHistory);
        activeTickers = List.copyOf(activeTickers);
        if (weights.length != tickers.size()) throw new IllegalArgumentException("weights length " + weights.length + " != tickers " + tickers.size());
        weights = weights.clone();
    }

    @Override
    public double[] weights() {
        return weights.clone();
    }
}
