package eigencov.service;

import java.util.List;

/**
 * An exposures request.
 *
 * @param tickers requested tickers in answer order (validated: well formed, no repeats, not empty)
 * @param missing what to do with tickers the fit does not cover
 */
public record ExposuresQuery(List<String> tickers, MissingTickers missing) {
    public ExposuresQuery {
        tickers = Tickers.checkList(tickers, "tickers");
        if (missing == null) throw new IllegalArgumentException("missing is required");
    }
}
