package eigencov.service;

import java.nio.DoubleBuffer;
import java.util.List;
import java.util.Objects;

/**
 * Covariance (or correlation) matrix of the answered tickers, n x n row-major, scaled to
 * {@code scale} (correlations are scale-free). Immutable: the public constructor copies the array
 * in, {@link #matrix()} copies it out, {@link #matrixView()} reads without a copy.
 *
 * <p>A final class rather than a record, alone among the answers: a record must copy its array in
 * its canonical constructor, and for the matrix the service has just computed that copy is a
 * second 2 MB array per 500-name answer (8 bytes n^2). Arrays that large are humongous objects in
 * G1, and each one allocated can start a collection: the query benchmark's GC log showed the
 * copy doubling the collections behind the latency tail of the .npy and JSON answers.
 * {@link #ofComputed} lets the service hand over an array nobody else holds.
 */
public final class CovarianceMatrix implements CovarianceAnswer {
    private final FitRef fit;
    private final List<String> tickers;
    private final List<String> omitted;
    private final Scale scale;
    private final boolean correlation;
    private final double[] matrix;

    /** Copies {@code matrix} (n x n, n = number of tickers). */
    public CovarianceMatrix(FitRef fit, List<String> tickers, List<String> omitted, Scale scale, boolean correlation,
                            double[] matrix) {
        this(matrix.clone(), fit, tickers, omitted, scale, correlation);
    }

    private CovarianceMatrix(double[] owned, FitRef fit, List<String> tickers, List<String> omitted, Scale scale,
                             boolean correlation) {
        this.fit = Objects.requireNonNull(fit, "fit");
        this.tickers = List.copyOf(tickers);
        this.omitted = List.copyOf(omitted);
        this.scale = Objects.requireNonNull(scale, "scale");
        this.correlation = correlation;
        int n = this.tickers.size();
        if (owned.length != n * n) throw new IllegalArgumentException("matrix length " + owned.length + " != " + n + " x " + n);
        this.matrix = owned;
    }

    /** Takes {@code computed} without a copy: for a matrix just computed, to which the caller keeps no reference. */
    static CovarianceMatrix ofComputed(FitRef fit, List<String> tickers, List<String> omitted, Scale scale, boolean correlation,
                                       double[] computed) {
        return new CovarianceMatrix(computed, fit, tickers, omitted, scale, correlation);
    }

    @Override
    public FitRef fit() {
        return fit;
    }

    @Override
    public List<String> tickers() {
        return tickers;
    }

    @Override
    public List<String> omitted() {
        return omitted;
    }

    public Scale scale() {
        return scale;
    }

    public boolean correlation() {
        return correlation;
    }

    /** A copy of the matrix. */
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

    @Override
    public String toString() {
        return "CovarianceMatrix[fit=" + fit + ", tickers=" + tickers.size() + ", omitted=" + omitted + ", scale=" + scale
                + ", correlation=" + correlation + "]";
    }
}
