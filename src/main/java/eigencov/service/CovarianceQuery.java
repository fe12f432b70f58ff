package eigencov.service;

import java.util.List;

/**
 * A covariance request: which tickers, in which form, over which horizon.
 *
 * @param tickers     requested tickers in answer order (validated: well formed, no repeats, not empty)
 * @param form        matrix or factor form
 * @param scale       horizon of the variances
 * @param correlation matrix form only: the correlation matrix instead of the covariance
 * @param missing     what to do with tickers the fit does not cover
 */
public record CovarianceQuery(List<String> tickers, CovarianceForm form, Scale scale, boolean correlation,
                              MissingTickers missing) {
    /**
     * Largest matrix-form request: 3,000 names (the top of the optimiser range in docs/design.md
     * section 1) is a 72 MB matrix; beyond that the factor form is the sensible payload.
     */
    public static final int MAX_MATRIX_TICKERS = 3_000;

    public CovarianceQuery {
        tickers = Tickers.checkList(tickers, "tickers");
        if (form == null || scale == null || missing == null) throw new IllegalArgumentException("form, scale and missing are required");
        if (correlation && form == CovarianceForm.FACTOR) {
            throw InvalidInputException.field("correlation", "applies to form=matrix only");
        }
        if (form == CovarianceForm.MATRIX && tickers.size() > MAX_MATRIX_TICKERS) {
            throw InvalidInputException.field("tickers", "matrix form is limited to " + MAX_MATRIX_TICKERS
                    + " tickers, was " + tickers.size() + "; ask for form=factor");
        }
    }
}
