package eigencov.math;

/**
 * Ledoit-Wolf linear shrinkage of a window's covariance S towards the scaled identity {@code m I}
 * (Ledoit and Wolf, 2004, "A well-conditioned estimator for large-dimensional covariance matrices",
 * J. Multivariate Analysis 88(2); docs/methods.md section 5), with the norm {@code ||A||^2 = tr(AA')/n}:
 * <pre>
 *   m = tr(S)/n,   d^2 = ||S - m I||^2,   bbar^2 = sum_t w_t^2 ||x_t x_t' - S||^2,
 *   b^2 = min(bbar^2, d^2),   alpha = b^2/d^2,   Sigma = alpha m I + (1 - alpha) S
 * </pre>
 * where x_t are the centred returns and w_t the window's weights (summing to 1). With equal weights
 * {@code w_t = 1/T} the sum is the published {@code T^-2 sum_t ||x_t x_t' - S||^2} (divisor T). With
 * half-life weights S is the weighted sum {@code sum_t w_t x_t x_t'}, whose sampling variance for
 * independent dates is {@code sum_t w_t^2 Var(x_t x_t')}: the same estimate with each date's square
 * weighted by {@code w_t^2} (our generalisation; it reduces to the published one for equal weights).
 *
 * <p>Everything comes from the T x T Gram matrix {@code G = Y Y'} of the weighted, centred window
 * ({@code S = Y'Y}): {@code tr S = tr G}, {@code ||S||_F = ||G||_F}, and
 * {@code w_t^2 ||x_t x_t' - S||_F^2 = G_tt^2 - 2 w_t sum_s G_ts^2 + w_t^2 ||S||_F^2}. Variances cost
 * O(T n); the inverse goes through an n x n Cholesky factor when n &lt;= T, else through Woodbury's identity
 * {@code Sigma^-1 = a^-1 I - c a^-2 Y'(I + (c/a) G)^-1 Y} and the determinant lemma
 * {@code ln|Sigma| = n ln a + ln|I + (c/a) G|} ({@code a = alpha m}, {@code c = 1 - alpha}), a T x T Cholesky factor.
 */
public final class LedoitWolf implements CovarianceForecast {
    private final WindowCovariance window;
    private final double m;
    private final double d2;
    private final double b2Bar;
    private final double alpha;
    private CovarianceInverse inverse;
    private boolean inverted;

    LedoitWolf(WindowCovariance window) {
        this.window = window;
        int n = window.names();
        int dates = window.dates();
        double[] g = window.gram();
        double trace = 0;
        double frob = 0;
        double[] rowNorm = new double[dates];
        for (int t = 0; t < dates; t++) {
            trace += g[t * dates + t];
            double r = Dense.dot(g, t * dates, g, t * dates, dates);
            rowNorm[t] = r;
            frob += r;
        }
        m = trace / n;
        d2 = frob / n - m * m;
        double b = 0;
        for (int t = 0; t < dates; t++) {
            double gtt = g[t * dates + t];
            double wt = window.weight(t);
            b += gtt * gtt - 2 * wt * rowNorm[t] + wt * wt * frob;
        }
        b2Bar = b / n;
        // d^2 = 0: S is already m I, and any intensity gives the same matrix; 1 keeps it invertible.
        alpha = d2 > 0 ? Math.min(b2Bar, d2) / d2 : 1.0;
    }

    /** The target's scale {@code m = tr(S)/n}. */
    public double m() {
        return m;
    }

    /** {@code d^2 = ||S - m I||^2}. */
    public double d2() {
        return d2;
    }

    /** {@code bbar^2}, the estimated sampling error of S (before it is capped at d^2). */
    public double b2Bar() {
        return b2Bar;
    }

    /** The shrinkage intensity {@code alpha = min(bbar^2, d^2) / d^2} in [0, 1]. */
    public double shrinkage() {
        return alpha;
    }

    private double a() {
        return alpha * m;
    }

    private double c() {
        return 1 - alpha;
    }

    /** {@code Sigma_ij}, O(T). */
    public double entry(int i, int j) {
        return (i == j ? a() : 0) + c() * window.entry(i, j);
    }

    @Override
    public int size() {
        return window.names();
    }

    @Override
    public double variance(double[] w) {
        window.checkLength(w);
        double ww = 0;
        for (double v : w) ww += v * v;
        return a() * ww + c() * window.quadratic(w);
    }

    @Override
    public double variance(int[] idx, double[] w) {
        double ww = 0;
        for (double v : w) ww += v * v;
        return a() * ww + c() * window.quadratic(idx, w);
    }

    @Override
    public double variance(int i) {
        return a() + c() * window.diagonal(i);
    }

    @Override
    public synchronized CovarianceInverse inverse() {
        if (!inverted) {
            inverted = true;
            inverse = invert();
        }
        return inverse;
    }

    private CovarianceInverse invert() {
        int n = window.names();
        int dates = window.dates();
        double a = a();
        double c = c();
        if (!(a > 0)) return window.sample().inverse();
        if (n <= dates) {
            double[] s = window.cross().clone();
            for (int p = 0; p < s.length; p++) s[p] *= c;
            for (int i = 0; i < n; i++) s[i * n + i] += a;
            return Cholesky.of(s, n);
        }
        double[] mm = window.gram().clone();
        double f = c / a;
        for (int p = 0; p < mm.length; p++) mm[p] *= f;
        for (int t = 0; t < dates; t++) mm[t * dates + t] += 1;
        Cholesky inner = Cholesky.of(mm, dates);
        return inner == null ? null : new Woodbury(a, c, inner);
    }

    /** {@code (a I + c Y'Y)^-1} through the T x T factor of {@code I + (c/a) Y Y'}. */
    private final class Woodbury implements CovarianceInverse {
        private final double a;
        private final double c;
        private final Cholesky inner;

        Woodbury(double a, double c, Cholesky inner) {
            this.a = a;
            this.c = c;
            this.inner = inner;
        }

        @Override
        public int size() {
            return window.names();
        }

        @Override
        public double logDeterminant() {
            return window.names() * Math.log(a) + inner.logDeterminant();
        }

        @Override
        public double quadraticForm(double[] x) {
            window.checkLength(x);
            double[] u = new double[window.dates()];
            window.times(x, u);
            return Dense.dot(x, 0, x, 0, x.length) / a - c / (a * a) * inner.quadraticForm(u);
        }

        @Override
        public double minimumVariance(double budget, double[] weights) {
            window.checkLength(weights);
            int n = weights.length;
            double[] ones = new double[n];
            java.util.Arrays.fill(ones, 1.0);
            double[] u = new double[window.dates()];
            window.times(ones, u);
            inner.solve(u, u);
            java.util.Arrays.fill(weights, 1.0 / a);
            window.addTransposeTimes(-c / (a * a), u, weights);
            return CovarianceInverse.fullyInvested(budget, weights);
        }
    }
}
