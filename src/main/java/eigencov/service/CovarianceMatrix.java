package eigencov.service;

import java.nio.DoubleBuffer;
import java.util.List;

/**
 * Covariance (or correlation) matrix of the answered tickers, n x n row-major, scaled to
 * {@code scale} (correlations are scale-free). Arrays are copied in and out; {@link #matrixView()}
 * reads without a copy.
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

    /**
     * The matrix without a copy, read-only: writers of large answers read it from here (a
     * 500-name matrix is 2 MB, and the copy of {@link #matrix()} showed in the benchmark).
     */
    public DoubleBuffer matrixView() {
        return DoubleBuffer.wrap(matrix).asReadOnlyBuffer();
    }
}
