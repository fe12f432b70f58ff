package eigencov.math;

import java.util.concurrent.ExecutorService;

/**
 * The covariance of a return window, kept in its T x n factor {@code Y} (row t = {@code sqrt(w_t)
 * (x_t - mu)}), so that {@code S = Y'Y = sum_t w_t (x_t - mu)(x_t - mu)'} (docs/design.md section 3) is
 * never formed when n &gt; T. The two baselines of a model evaluation (docs/design.md section 6,
 * docs/methods.md sections 5 and 10) come from it: {@link #sample()} and {@link #ledoitWolf()}.
 *
 * <p>A gap (NaN) is the name's mean: its centred value is 0. Means are weighted over each name's
 * observed dates ({@code mu_i = sum_obs w_t x_ti / sum_obs w_t}); weights are those of the window
 * (they sum to 1). A portfolio variance costs O(T n); the inverse costs O(T n min(T, n)) plus a
 * Cholesky factorisation of size min(T, n).
 */
public final class WindowCovariance {
    private final int dates;
    private final int names;
    private final double[] weights;
    /** T x n row-major. */
    private final double[] y;
    /** S_ii. */
    private final double[] diag;
    private final Parallel par;
    private double[] gram;
    private double[] cross;
    private CovarianceForecast sample;
    private LedoitWolf ledoitWolf;

    private WindowCovariance(int dates, int names, double[] weights, double[] y, double[] diag, Parallel par) {
        this.dates = dates;
        this.names = names;
        this.weights = weights;
        this.y = y;
        this.diag = diag;
        this.par = par;
    }

    /**
     * @param values     T x n returns, row-major by date, NaN where a name has no return
     * @param weights    T positive weights (normalised here to sum to 1)
     * @param poolOrNull executor for the T x T and n x n products; null runs them on the calling thread
     * @throws IllegalArgumentException on a shape mismatch, a non-positive weight or a name without any return
     */
    public static WindowCovariance of(double[] values, int dates, int names, double[] weights, ExecutorService poolOrNull) {
        if (dates < 2 || names < 1) throw new IllegalArgumentException("need at least 2 dates and 1 name, were " + dates + " and " + names);
        if (values.length != (long) dates * names) throw new IllegalArgumentException("values length " + values.length + " != " + dates + " x " + names);
        if (weights.length != dates) throw new IllegalArgumentException("weights length " + weights.length + " != dates " + dates);
        double total = 0;
        for (double w : weights) {
            if (!(w > 0) || Double.isInfinite(w)) throw new IllegalArgumentException("weights must be positive and finite, was " + w);
            total += w;
        }
        double[] wt = new double[dates];
        double[] root = new double[dates];
        for (int t = 0; t < dates; t++) {
            wt[t] = weights[t] / total;
            root[t] = Math.sqrt(wt[t]);
        }
        double[] mu = new double[names];
        double[] seen = new double[names];
        for (int t = 0; t < dates; t++) {
            int o = t * names;
            for (int i = 0; i < names; i++) {
                double x = values[o + i];
                if (x == x) {
                    mu[i] += wt[t] * x;
                    seen[i] += wt[t];
                }
            }
        }
        for (int i = 0; i < names; i++) {
            if (seen[i] == 0) throw new IllegalArgumentException("name " + i + " has no return in the window");
            mu[i] /= seen[i];
        }
        double[] y = new double[dates * names];
        double[] diag = new double[names];
        for (int t = 0; t < dates; t++) {
            int o = t * names;
            for (int i = 0; i < names; i++) {
                double x = values[o + i];
                double v = x == x ? root[t] * (x - mu[i]) : 0.0;
                y[o + i] = v;
                diag[i] += v * v;
            }
        }
        return new WindowCovariance(dates, names, wt, y, diag, new Parallel(poolOrNull));
    }

    /** T. */
    public int dates() {
        return dates;
    }

    /** n. */
    public int names() {
        return names;
    }

    /** {@code S_ij = sum_t Y_ti Y_tj}, O(T). */
    public double entry(int i, int j) {
        double s = 0;
        for (int t = 0; t < dates; t++) s += y[t * names + i] * y[t * names + j];
        return s;
    }

    /** The window's sample covariance S; invertible only when n &lt; T (the weighted centring removes one dimension). */
    public synchronized CovarianceForecast sample() {
        if (sample == null) sample = new Sample();
        return sample;
    }

    /** Ledoit-Wolf shrinkage of S towards {@code m I} (docs/methods.md section 5), weighted as the window is. */
    public synchronized LedoitWolf ledoitWolf() {
        if (ledoitWolf == null) ledoitWolf = new LedoitWolf(this);
        return ledoitWolf;
    }

    // ------------------------------------------------------------------ package-private pieces for LedoitWolf

    double weight(int t) {
        return weights[t];
    }

    double diagonal(int i) {
        return diag[i];
    }

    /** {@code ||Y w||^2 = w' S w}. */
    double quadratic(double[] w) {
        double s = 0;
        for (int t = 0; t < dates; t++) {
            double u = Dense.dot(y, t * names, w, 0, names);
            s += u * u;
        }
        return s;
    }

    double quadratic(int[] idx, double[] w) {
        double s = 0;
        for (int t = 0; t < dates; t++) {
            int o = t * names;
            double u = 0;
            for (int a = 0; a < idx.length; a++) u += y[o + idx[a]] * w[a];
            s += u * u;
        }
        return s;
    }

    /** {@code u = Y x} (T). */
    void times(double[] x, double[] u) {
        for (int t = 0; t < dates; t++) u[t] = Dense.dot(y, t * names, x, 0, names);
    }

    /** {@code v += alpha Y' u} (n). */
    void addTransposeTimes(double alpha, double[] u, double[] v) {
        for (int t = 0; t < dates; t++) {
            if (u[t] != 0) Dense.axpy(alpha * u[t], y, t * names, v, 0, names);
        }
    }

    /** {@code G = Y Y'} (T x T), computed once: O(T^2 n). */
    synchronized double[] gram() {
        if (gram == null) {
            double[] yt = new double[names * dates];
            Dense.transpose(y, dates, names, yt);
            double[] g = new double[dates * dates];
            Dense.crossProduct(yt, names, dates, g, par);
            gram = g;
        }
        return gram;
    }

    /** {@code S = Y'Y} (n x n), computed once: O(T n^2); only asked for when n &lt;= T. */
    synchronized double[] cross() {
        if (cross == null) {
            double[] s = new double[names * names];
            Dense.crossProduct(y, dates, names, s, par);
            cross = s;
        }
        return cross;
    }

    /** The sample covariance as a forecast. */
    private final class Sample implements CovarianceForecast {
        private CovarianceInverse inverse;
        private boolean inverted;

        @Override
        public int size() {
            return names;
        }

        @Override
        public double variance(double[] w) {
            checkLength(w);
            return quadratic(w);
        }

        @Override
        public double variance(int[] idx, double[] w) {
            return quadratic(idx, w);
        }

        @Override
        public double variance(int i) {
            return diag[i];
        }

        @Override
        public synchronized CovarianceInverse inverse() {
            if (!inverted) {
                inverted = true;
                inverse = names < dates ? Cholesky.of(cross(), names) : null;
            }
            return inverse;
        }
    }

    void checkLength(double[] w) {
        if (w.length != names) throw new IllegalArgumentException("w has length " + w.length + ", expected " + names);
    }
}
