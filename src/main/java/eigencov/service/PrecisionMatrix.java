package eigencov.service;

/**
 * The inverse of the answered tickers' covariance submatrix, {@code (scale C_S)^-1} (docs/design.md
 * section 6, "Inverse and minimum variance"), n x n row-major, held without a copy
 * ({@link MatrixAnswer}; a 3,000-name answer is 72 MB).
 */
public final class PrecisionMatrix extends MatrixAnswer {
    private PrecisionMatrix(double[] owned, FitRef fit, TickerSelection sel, Scale scale) {
        super(owned, fit, sel.kept(), sel.omitted(), sel.shortHistory(), scale);
    }

    /** Takes {@code computed} without a copy: the caller keeps no reference to it. */
    static PrecisionMatrix ofComputed(FitRef fit, TickerSelection sel, Scale scale, double[] computed) {
        return new PrecisionMatrix(computed, fit, sel, scale);
    }
}
