package eigencov.service;

/**
 * What a query does with tickers the fit does not cover (unknown, or excluded from its universe).
 */
public enum MissingTickers {
    /** Reject the query (HTTP 422) listing every such ticker and why. The default. */
    ERROR,
    /** Answer on the covered tickers and list the others as omitted. */
    OMIT
}
