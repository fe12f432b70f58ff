package eigencov.math;

/**
 * The inverse of a positive definite covariance C on n names, used without ever forming it:
 * quadratic forms, the log-determinant and the fully invested minimum-variance portfolio.
 */
public interface CovarianceInverse {
    /** Number of names n. */
    int size();

    /** {@code ln|C|}. */
    double logDeterminant();

    /** {@code x' C^-1 x} for x of length n. */
    double quadraticForm(double[] x);

    /**
     * Writes {@code w = budget C^-1 1 / (1' C^-1 1)} to {@code weights} (length n) and returns its
     * variance {@code budget^2 / (1' C^-1 1)}.
     */
    double minimumVariance(double budget, double[] weights);

    /**
     * Scales {@code v = C^-1 1} in place to the fully invested weights {@code budget v / 1'v} and returns
     * their variance {@code budget^2 / 1'v}: the last step of every {@link #minimumVariance}.
     */
    static double fullyInvested(double budget, double[] v) {
        double total = 0;
        for (double x : v) total += x;
        double f = budget / total;
        for (int i = 0; i < v.length; i++) v[i] *= f;
        return budget * budget / total;
    }
}
