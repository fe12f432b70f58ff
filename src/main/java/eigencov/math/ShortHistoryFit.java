package eigencov.math;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashMap;
import java.util.List;
import java.util.Map;

/**
 * Short-history names (docs/design.md section 6; docs/methods.md section 7, project-in): a step
 * after the main fit that serves names below the coverage threshold which still have at least
 * {@link FitOptions#shortHistoryMinObservations()} observations in the window. It reads only the
 * fit's factor returns and the window, so it does not depend on how the factors were computed, and
 * it changes nothing of the universe's model.
 *
 * <p>For each such name, over the dates O it has: exposures b by weighted least squares with an
 * intercept (the model's time weights w_t) of its returns on the factor returns,
 * {@code min sum_O w_t (x_t - a - f_t' b)^2}; specific variance the weighted mean squared residual
 * {@code sum_O w_t e_t^2 / sum_O w_t}, floored at {@code specificFloor} times the name's weighted
 * variance over the same dates. For a name with the full window this regression gives back the main
 * fit's exposures exactly (the factor returns' weighted covariance is F, and (x - mu)'f_j = lambda_j
 * e_ij), so short-history names sit in the same factor space as the universe.
 *
 * <p>A name whose factor returns over its dates are collinear (the weighted cross-product is not
 * positive definite) stays excluded for coverage; a name whose returns are constant over its dates
 * is excluded with reason {@link Exclusion#ZERO_VARIANCE}. Cost O(n_i k^2) per name.
 */
public final class ShortHistoryFit {
    private ShortHistoryFit() {
    }

    /**
     * The fit with its short-history names; {@code fit} itself when the option is off.
     *
     * @param fit     the main fit of {@code window} with {@code options}
     * @param window  the window the fit was made on (same dates)
     * @param options the fit's options; {@link FitOptions#shortHistoryMinObservations()} null = off
     * @throws IllegalArgumentException when the minimum is below k + 2 for the fit's k, or above the window's dates
     */
    public static FitResult extend(FitResult fit, ReturnPanel window, FitOptions options) {
        Integer min = options.shortHistoryMinObservations();
        if (min == null) return fit;
        long start = System.nanoTime();
        int k = fit.model().factors();
        int dates = window.rows();
        if (min < k + 2) {
            throw new IllegalArgumentException("shortHistory.minObservations " + min + " is below k + 2 = " + (k + 2)
                    + " for this fit's " + k + " factors (an intercept, " + k + " exposures and one residual degree of freedom)");
        }
        if (min > dates) {
            throw new IllegalArgumentException("shortHistory.minObservations " + min + " is above the window's " + dates + " dates");
        }
        if (!fit.dates().equals(window.dates())) {
            throw new IllegalArgumentException("the fit was not made on this window (its dates differ)");
        }
        Map<String, Integer> column = new HashMap<>(window.cols() * 2);
        for (int i = 0; i < window.cols(); i++) column.put(window.tickers().get(i), i);
        double[] w = FactorFitter.weights(dates, options.halfLifeDays());
        double[] f = fit.factorReturns();
        double[] x = new double[dates];
        Regression reg = new Regression(k, dates);

        List<Exclusion> excluded = new ArrayList<>(fit.excluded().size());
        List<String> names = new ArrayList<>();
        int[] observations = new int[fit.excluded().size()];
        double[] exposures = new double[fit.excluded().size() * k];
        double[] specific = new double[fit.excluded().size()];
        int n = 0;
        for (Exclusion e : fit.excluded()) {
            Integer col = column.get(e.ticker());
            if (!Exclusion.COVERAGE.equals(e.reason()) || e.observations() < min || col == null) {
                excluded.add(e);
                continue;
            }
            for (int t = 0; t < dates; t++) x[t] = window.value(t, col);
            int outcome = reg.fit(x, f, w, options.specificFloor(), exposures, n * k);
            if (outcome == Regression.OK) {
                names.add(e.ticker());
                observations[n] = e.observations();
                specific[n] = reg.specificVariance;
                n++;
            } else if (outcome == Regression.CONSTANT) {
                excluded.add(new Exclusion(e.ticker(), e.observations(), e.required(), Exclusion.ZERO_VARIANCE));
            } else {
                excluded.add(e);
            }
        }
        ShortHistory sh = n == 0 ? ShortHistory.NONE : new ShortHistory(names, Arrays.copyOf(observations, n), k,
                Arrays.copyOf(exposures, n * k), Arrays.copyOf(specific, n));
        return fit.withShortHistory(sh, excluded, System.nanoTime() - start);
    }

    /** One name's weighted regression with intercept, reusing its scratch arrays between names. */
    private static final class Regression {
        static final int OK = 0;
        static final int CONSTANT = 1;
        static final int COLLINEAR = 2;

        private final int k;
        /** Observed dates of the current name. */
        private final int[] at;
        private final double[] fbar;
        private final double[] df;
        /** Weighted cross-product of the centred factor returns (k x k), then its Cholesky factor. */
        private final double[] g;
        private final double[] c;
        double specificVariance;

        Regression(int k, int dates) {
            this.k = k;
            at = new int[dates];
            fbar = new double[k];
            df = new double[k];
            g = new double[k * k];
            c = new double[k];
        }

        /** Fits x (NaN = missing) on f (T x k); writes the exposures at {@code out[off..off+k)}. */
        int fit(double[] x, double[] f, double[] w, double floor, double[] out, int off) {
            int n = 0;
            double sw = 0;
            double sx = 0;
            Arrays.fill(fbar, 0);
            for (int t = 0; t < x.length; t++) {
                double v = x[t];
                if (v != v) continue;
                at[n++] = t;
                double wt = w[t];
                sw += wt;
                sx += wt * v;
                int o = t * k;
                for (int j = 0; j < k; j++) fbar[j] += wt * f[o + j];
            }
            double xbar = sx / sw;
            for (int j = 0; j < k; j++) fbar[j] /= sw;
            Arrays.fill(g, 0);
            Arrays.fill(c, 0);
            double vx = 0;
            double big = 0;
            double worst = 0;
            for (int a = 0; a < n; a++) {
                int t = at[a];
                double wt = w[t];
                double dx = x[t] - xbar;
                vx += wt * dx * dx;
                big = Math.max(big, Math.abs(x[t]));
                worst = Math.max(worst, Math.abs(dx));
                int o = t * k;
                for (int j = 0; j < k; j++) df[j] = f[o + j] - fbar[j];
                for (int p = 0; p < k; p++) {
                    double wp = wt * df[p];
                    c[p] += wp * dx;
                    int row = p * k;
                    for (int q = 0; q <= p; q++) g[row + q] += wp * df[q];
                }
            }
            // constant up to rounding of the mean (as FactorFitter's zero-variance test)
            if (worst <= 1e-13 * big) return CONSTANT;
            double variance = vx / sw;
            if (!FactorInverse.cholesky(g, k)) return COLLINEAR;
            // G b = c: forward (L y = c), then backward (L' b = y)
            for (int p = 0; p < k; p++) {
                double s = c[p];
                for (int q = 0; q < p; q++) s -= g[p * k + q] * out[off + q];
                out[off + p] = s / g[p * k + p];
            }
            for (int p = k - 1; p >= 0; p--) {
                double s = out[off + p];
                for (int q = p + 1; q < k; q++) s -= g[q * k + p] * out[off + q];
                out[off + p] = s / g[p * k + p];
            }
            double rss = 0;
            for (int a = 0; a < n; a++) {
                int t = at[a];
                int o = t * k;
                double r = x[t] - xbar;
                for (int j = 0; j < k; j++) r -= (f[o + j] - fbar[j]) * out[off + j];
                rss += w[t] * r * r;
            }
            specificVariance = Math.max(rss / sw, floor * variance);
            return OK;
        }
    }
}
