package eigencov.service;

import java.util.List;

/**
 * A request for the minimum-variance portfolio of a ticker list.
 *
 * @param tickers requested tickers in answer order (validated: well formed, no repeats, not empty)
 * @param budget  what the weights sum to: finite and not zero (default {@link #DEFAULT_BUDGET}, fully invested)
 * @param scale   horizon of the volatility answered (the weights do not depend on it)
 * @param missing what to do with tickers the fit does not cover
 */
public record MinimumVarianceQuery(List<String> tickers, double budget, Scale scale, MissingTickers missing) {
    public static final double DEFAULT_BUDGET = 1.0;

    public MinimumVarianceQuery {
        tickers = Tickers.checkList(tickers, "tickers");
        if (scale == null || missing == null) throw new IllegalArgumentException("scale and missing are required");
        if (!Double.isFinite(budget) || budget == 0) {
            throw InvalidInputException.field("budget", "must be a finite number other than 0, was " + budget);
        }
    }
}
