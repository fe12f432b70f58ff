package eigencov.service;

import java.util.List;

/**
 * Covariance (or correlation) matrix of the answered tickers, n x n row-major, scaled to
 * {@code scale} (correlations are scale-free). Arrays are copied in and out.
 */
public record CovarianceMatrix(FitRef fit, List<String> tickers, List<String> omitted, Scale scale, boolean correlation,
                               double[] matrix) implements CovarianceAnswer {
    public CovarianceMatrix {
        tickers = List.copyOf(tickers);
        omitted = List.copyOf(omitted);
        int n = tickers.size();
        if (matrix.length != n * n) throw new IllegalArgumentException("matrix length " + matrix.length + " != " + n + " x " + n);
        matrix = matrix.clone();
    }

    @Override
    public double[] matrix() {
        return matrix.clone();
    }
}
