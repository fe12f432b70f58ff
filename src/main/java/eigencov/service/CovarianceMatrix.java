package eigencov.service;

import java.util.List;

/**
 * Covariance (or correlation) matrix of the answered tickers, n x n row-major, scaled to
 * {@code scale} (correlations are scale-free). The public constructor copies the array in;
 * {@link #ofComputed} takes one the service has just computed (see {@link MatrixAnswer}).
 */
public final class CovarianceMatrix extends MatrixAnswer implements CovarianceAnswer {
    private final boolean correlation;

    /**
     * Copies {@code matrix} (n x n, n = number of tickers).
     *
     * @param shortHistory the answered tickers that are short-history names of the fit
     */
    public CovarianceMatrix(FitRef fit, List<String> tickers, List<String> omitted, List<String> shortHistory, Scale scale,
                            boolean correlation, double[] matrix) {
        super(matrix.clone(), fit, tickers, omitted, shortHistory, scale);
        this.correlation = correlation;
    }

    private CovarianceMatrix(double[] owned, TickerSelection sel, FitRef fit, Scale scale, boolean correlation) {
        super(owned, fit, sel.kept(), sel.omitted(), sel.shortHistory(), scale);
        this.correlation = correlation;
    }

    /** Takes {@code computed} without a copy: for a matrix just computed, to which the caller keeps no reference. */
    static CovarianceMatrix ofComputed(FitRef fit, TickerSelection sel, Scale scale, boolean correlation, double[] computed) {
        return new CovarianceMatrix(computed, sel, fit, scale, correlation);
    }

    public boolean correlation() {
        return correlation;
    }
}
