package eigencov.service;

import java.util.List;

/** A covariance answer in either form; both name the fit, the answered tickers and the omitted ones. */
public sealed interface CovarianceAnswer permits CovarianceMatrix, FactorForm {
    FitRef fit();

    /** Answered tickers, in request order. */
    List<String> tickers();

    /** Requested tickers the fit does not cover (empty unless missing=omit). */
    List<String> omitted();

    /** Answered tickers that are short-history names of the fit (docs/design.md section 6), in answer order. */
    List<String> shortHistory();
}
