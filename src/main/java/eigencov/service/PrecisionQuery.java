package eigencov.service;

import java.util.List;

/**
 * A request for the inverse of a covariance submatrix.
 *
 * @param tickers requested tickers in answer order (validated: well formed, no repeats, not empty, at most
 *                {@link CovarianceQuery#MAX_MATRIX_TICKERS})
 * @param scale   horizon of the covariance that is inverted
 * @param missing what to do with tickers the fit does not cover
 */
public record PrecisionQuery(List<String> tickers, Scale scale, MissingTickers missing) {
    public PrecisionQuery {
        tickers = Tickers.checkList(tickers, "tickers");
        if (scale == null || missing == null) throw new IllegalArgumentException("scale and missing are required");
        if (tickers.size() > CovarianceQuery.MAX_MATRIX_TICKERS) {
            throw InvalidInputException.field("tickers", "the inverse is limited to " + CovarianceQuery.MAX_MATRIX_TICKERS
                    + " tickers (a dense matrix), was " + tickers.size());
        }
    }
}
