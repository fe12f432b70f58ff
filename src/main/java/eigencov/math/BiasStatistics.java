package eigencov.math;

import java.util.Arrays;

/**
 * The statistics of a risk-forecast evaluation (docs/methods.md section 10): for standardised outcomes
 * {@code z = r / sigma} the bias statistic {@code b = sd(z)} (divisor n - 1), its approximate 95 % band
 * {@code 1 +- sqrt(2/n)} under a correct Gaussian forecast ({@code (n-1) b^2 ~ chi^2_{n-1}}), and the
 * QLIKE term {@code q = z^2 - ln z^2} (Patton, 2011: it ranks forecasts as the QLIKE loss does; its
 * minimum over sigma is at the true variance).
 */
public final class BiasStatistics {
    private BiasStatistics() {
    }

    /** {@code [1 - sqrt(2/n), 1 + sqrt(2/n)]}, the approximate 95 % band of b for n outcomes (n &gt;= 1). */
    public static double[] band(int n) {
        if (n < 1) throw new IllegalArgumentException("n must be at least 1, was " + n);
        double h = Math.sqrt(2.0 / n);
        return new double[] {1 - h, 1 + h};
    }

    /** {@code z^2 - ln z^2} for {@code z2 = z^2 > 0}. */
    public static double qlike(double z2) {
        if (!(z2 > 0) || Double.isInfinite(z2)) throw new IllegalArgumentException("z^2 must be positive and finite, was " + z2);
        return z2 - Math.log(z2);
    }

    /** The median of the first n values (n &gt;= 1; the array is not changed). */
    public static double median(double[] x, int n) {
        if (n < 1) throw new IllegalArgumentException("median of nothing");
        double[] s = Arrays.copyOf(x, n);
        Arrays.sort(s);
        return n % 2 == 1 ? s[n / 2] : 0.5 * (s[n / 2 - 1] + s[n / 2]);
    }

    /**
     * Running moments of one outcome series (Welford's update, so long series of similar values keep
     * their precision), with the QLIKE sum over its non-zero outcomes.
     */
    public static final class Moments {
        private int n;
        private double mean;
        private double m2;
        private double qSum;
        private int qCount;

        /** Adds one outcome. */
        public void add(double z) {
            n++;
            double d = z - mean;
            mean += d / n;
            m2 += d * (z - mean);
            double z2 = z * z;
            // z = 0 (a realised return of exactly 0) has no QLIKE term: ln 0 is not a number.
            if (z2 > 0 && !Double.isInfinite(z2)) {
                qSum += BiasStatistics.qlike(z2);
                qCount++;
            }
        }

        public int count() {
            return n;
        }

        /** The sample standard deviation (divisor n - 1), or NaN below two outcomes. */
        public double sd() {
            return n < 2 ? Double.NaN : Math.sqrt(m2 / (n - 1));
        }

        /** The mean QLIKE term, or NaN when there is none. */
        public double qlike() {
            return qCount == 0 ? Double.NaN : qSum / qCount;
        }

        double qSum() {
            return qSum;
        }

        int qCount() {
            return qCount;
        }
    }
}
