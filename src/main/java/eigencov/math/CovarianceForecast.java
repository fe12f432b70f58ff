package eigencov.math;

/**
 * A covariance forecast C on n names (positions 0..n-1), as a model evaluation scores it: the
 * variance of any portfolio and, when C is invertible, its inverse (docs/methods.md section 10).
 * Implementations never form an n x n matrix unless they say so.
 */
public interface CovarianceForecast {
    /** Number of names n. */
    int size();

    /** {@code w' C w} for dense weights w (length n). */
    double variance(double[] w);

    /** {@code w' C w} for the weights {@code w[a]} on the positions {@code idx[a]} (others 0). */
    double variance(int[] idx, double[] w);

    /** {@code C_ii}. */
    double variance(int i);

    /** The inverse, or null when C is singular. Computed on first use and kept. */
    CovarianceInverse inverse();
}
