package eigencov.service;

import java.nio.DoubleBuffer;
import java.util.List;
import java.util.Objects;

/**
 * An n x n matrix answer over the answered tickers (rows and columns in request order): a
 * covariance or correlation matrix, or the inverse of a covariance. Immutable.
 *
 * <p>A class rather than a record, as the answers' only array-holding type that does not copy: a
 * record must copy its array in its canonical constructor, and for the matrix the service has just
 * computed that copy is a second 2 MB array per 500-name answer (8 bytes n^2; 72 MB at 3,000).
 * Arrays that large are humongous objects in G1, and each one allocated can start a collection: the
 * query benchmark's GC log showed the copy doubling the collections behind the latency tail of the
 * .npy and JSON answers. Subclasses hand over an array nobody else holds; {@link #matrix()} copies it
 * out, {@link #matrixView()} reads it without a copy.
 */
public abstract sealed class MatrixAnswer permits CovarianceMatrix, PrecisionMatrix {
    private final FitRef fit;
    private final List<String> tickers;
    private final List<String> omitted;
    private final List<String> shortHistory;
    private final Scale scale;
    private final double[] matrix;

    MatrixAnswer(double[] owned, FitRef fit, List<String> tickers, List<String> omitted, List<String> shortHistory, Scale scale) {
        this.fit = Objects.requireNonNull(fit, "fit");
        this.tickers = List.copyOf(tickers);
        this.omitted = List.copyOf(omitted);
        this.shortHistory = List.copyOf(shortHistory);
        this.scale = Objects.requireNonNull(scale, "scale");
        int n = this.tickers.size();
        if (owned.length != (long) n * n) throw new IllegalArgumentException("matrix length " + owned.length + " != " + n + " x " + n);
        this.matrix = owned;
    }

    public FitRef fit() {
        return fit;
    }

    /** Answered tickers, in request order: the rows and columns. */
    public List<String> tickers() {
        return tickers;
    }

    /** Requested tickers the fit does not cover (empty unless missing=omit). */
    public List<String> omitted() {
        return omitted;
    }

    /** Answered tickers that are short-history names of the fit (docs/design.md section 6), in answer order. */
    public List<String> shortHistory() {
        return shortHistory;
    }

    /** The horizon of the covariance (for an inverse: of the covariance that was inverted). */
    public Scale scale() {
        return scale;
    }

    /** A copy of the matrix. */
    public double[] matrix() {
        return matrix.clone();
    }

    /**
     * The matrix without a copy, read-only: writers of large answers read it from here (a 500-name
     * matrix is 2 MB, and the copy of {@link #matrix()} showed in the benchmark).
     */
    public DoubleBuffer matrixView() {
        return DoubleBuffer.wrap(matrix).asReadOnlyBuffer();
    }

    @Override
    public String toString() {
        return getClass().getSimpleName() + "[fit=" + fit + ", tickers=" + tickers.size() + ", omitted=" + omitted + ", scale=" + scale + "]";
    }
}
