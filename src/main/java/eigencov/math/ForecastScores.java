package eigencov.math;

import java.time.LocalDate;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;

/**
 * Scores one forecaster (a model, or a baseline of it) over the forecast dates of an evaluation
 * (docs/design.md section 6, docs/methods.md sections 10-11). At each date t it is given its
 * covariance forecast C_t on the test names and their realised returns over the next h dates,
 * {@code r_i = sum_{s=1..h} x_{i,t+s}}; a portfolio w is scored by {@code z = w'r / sqrt(h w'C_t w)}.
 *
 * <ul>
 * <li>{@code equal}: equal weights on the date's names; b = sd(z) over dates, its band, qlike.</li>
 * <li>{@code single}: each name alone; b per name over the dates it is present (at least 2), then the
 *     median b, the share of names inside their own band, and the qlike over every (name, date).</li>
 * <li>{@code random}: the given fixed portfolios, scored like single names.</li>
 * <li>{@code minimum-variance}: {@code w = C_t^-1 1 / 1'C_t^-1 1} on the date's names; b, band, qlike,
 *     the realised volatility {@code sd(w'r) sqrt(252/h)} and the turnover (mean over consecutive
 *     dates of {@code sum_i |w_t,i - w_t-1,i|}, absent names weighing 0).</li>
 * <li>log-likelihood: the mean over dates of {@code -1/2 [N ln 2 pi + ln|h C_t| + r'(h C_t)^-1 r]} for the
 *     return vector of the date's names.</li>
 * </ul>
 * Minimum variance and the log-likelihood need C_t^-1; when a date's forecast has none (a sample
 * covariance with at least as many names as dates), both are null for the forecaster, and the
 * series carries null for that date. A portfolio whose forecast variance is not positive is left out
 * of that date. Not thread-safe: one instance per forecaster, fed in date order.
 */
public final class ForecastScores {
    /** Trading days a year, for annualising (common practice, docs/design.md section 3). */
    public static final double DAYS_A_YEAR = 252;
    private static final double LN_2PI = Math.log(2 * Math.PI);

    private final int horizon;
    private final BiasStatistics.Moments equal = new BiasStatistics.Moments();
    private final BiasStatistics.Moments[] single;
    private final BiasStatistics.Moments[] random;
    private final BiasStatistics.Moments minimum = new BiasStatistics.Moments();
    private final BiasStatistics.Moments minimumReturns = new BiasStatistics.Moments();
    private final List<Point> series = new ArrayList<>();
    private boolean invertible = true;
    private double logLikelihoodSum;
    private int dates;
    private double turnoverSum;
    private int turnoverCount;
    /** Previous date's minimum-variance weights by global name id (0 where absent) and the ids that hold one. */
    private final double[] previous;
    private int[] previousIds;

    /**
     * @param horizonDays h, at least 1
     * @param names       size of the global name space the dates' {@code ids} index
     * @param randomCount random portfolios scored at every date (0: none)
     */
    public ForecastScores(int horizonDays, int names, int randomCount) {
        if (horizonDays < 1) throw new IllegalArgumentException("horizonDays must be at least 1, was " + horizonDays);
        this.horizon = horizonDays;
        this.single = moments(names);
        this.random = moments(randomCount);
        this.previous = new double[names];
    }

    private static BiasStatistics.Moments[] moments(int n) {
        BiasStatistics.Moments[] m = new BiasStatistics.Moments[n];
        for (int i = 0; i < n; i++) m[i] = new BiasStatistics.Moments();
        return m;
    }

    /** One date's outcome for the series: z of the equal portfolio, the minimum-variance return and forecast volatility over h. */
    public record Point(LocalDate date, double z, Double minimumVarianceReturn, Double minimumVarianceVolatility) {
    }

    /**
     * Scores one forecast date.
     *
     * @param c        the forecast on the date's n test names
     * @param realised n realised returns over the horizon, in the forecast's name order
     * @param ids      n global name ids (distinct), for the per-name statistics and the turnover
     * @param members  for each random portfolio, its names' positions in this date's names (null: no random family)
     * @param weights  for each random portfolio, its weights
     */
    public void add(LocalDate date, CovarianceForecast c, double[] realised, int[] ids, int[][] members, double[][] weights) {
        int n = c.size();
        if (realised.length != n || ids.length != n) {
            throw new IllegalArgumentException("realised and ids must have the forecast's " + n + " names, had " + realised.length + " and " + ids.length);
        }
        dates++;
        double[] w = new double[n];
        Arrays.fill(w, 1.0 / n);
        double r = 0;
        for (int i = 0; i < n; i++) r += realised[i];
        r /= n;
        double zEqual = score(equal, r, c.variance(w));

        for (int i = 0; i < n; i++) score(single[ids[i]], realised[i], c.variance(i));
        if (members != null) {
            for (int p = 0; p < members.length; p++) {
                int[] at = members[p];
                double rp = 0;
                for (int a = 0; a < at.length; a++) rp += weights[p][a] * realised[at[a]];
                score(random[p], rp, c.variance(at, weights[p]));
            }
        }

        Double mvReturn = null;
        Double mvVol = null;
        CovarianceInverse inv = invertible ? c.inverse() : null;
        if (inv == null) {
            invertible = false;
        } else {
            double[] mv = new double[n];
            double var = inv.minimumVariance(1.0, mv);
            double rm = 0;
            for (int i = 0; i < n; i++) rm += mv[i] * realised[i];
            score(minimum, rm, var);
            minimumReturns.add(rm);
            mvReturn = rm;
            mvVol = Math.sqrt(horizon * var);
            turnover(mv, ids);
            // -1/2 [N ln 2 pi + ln|h C| + r'(h C)^-1 r], ln|h C| = N ln h + ln|C|
            logLikelihoodSum += -0.5 * (n * (LN_2PI + Math.log(horizon)) + inv.logDeterminant() + inv.quadraticForm(realised) / horizon);
        }
        series.add(new Point(date, zEqual, mvReturn, mvVol));
    }

    /** Adds z = r / sqrt(h var) to {@code m} when var &gt; 0; returns z (NaN when left out). */
    private double score(BiasStatistics.Moments m, double r, double var) {
        if (!(var > 0) || Double.isInfinite(var)) return Double.NaN;
        double z = r / Math.sqrt(horizon * var);
        m.add(z);
        return z;
    }

    private void turnover(double[] w, int[] ids) {
        if (previousIds != null) {
            double sum = 0;
            for (int i = 0; i < ids.length; i++) {
                sum += Math.abs(w[i] - previous[ids[i]]);
                previous[ids[i]] = Double.NaN; // visited
            }
            for (int id : previousIds) {
                if (!Double.isNaN(previous[id])) sum += Math.abs(previous[id]);
                previous[id] = 0;
            }
            turnoverSum += sum;
            turnoverCount++;
        }
        for (int i = 0; i < ids.length; i++) previous[ids[i]] = w[i];
        previousIds = ids.clone();
    }

    /** equal: {@code bias} (b = sd z), its {@code band}, {@code n} dates, mean {@code qlike}; nulls below two dates. */
    public record Family(Double bias, double[] band, int n, Double qlike) {
    }

    /** single and random: median b over portfolios with at least two dates, the share inside their own band, their count, the mean qlike. */
    public record Spread(Double median, Double insideBand, int n, Double qlike) {
    }

    /** minimum-variance: as {@link Family}, with the annualised realised volatility and the mean turnover. */
    public record MinimumVariance(Double bias, double[] band, int n, Double qlike, Double realisedVolatility, Double turnover) {
    }

    /**
     * Everything scored.
     *
     * @param random          null when no random portfolios were scored
     * @param minimumVariance null when a date's forecast had no inverse
     * @param logLikelihood   null likewise
     */
    public record Scores(Family equal, Spread single, Spread random, MinimumVariance minimumVariance, Double logLikelihood,
                         List<Point> series) {
        public Scores {
            series = List.copyOf(series);
        }
    }

    public Scores result() {
        Family eq = family(equal);
        Spread sg = spread(single);
        Spread rd = random.length == 0 ? null : spread(random);
        MinimumVariance mv = null;
        Double ll = null;
        if (invertible && dates > 0) {
            Family f = family(minimum);
            double vol = minimumReturns.sd() * Math.sqrt(DAYS_A_YEAR / horizon);
            mv = new MinimumVariance(f.bias(), f.band(), f.n(), f.qlike(), finite(vol),
                    turnoverCount == 0 ? null : turnoverSum / turnoverCount);
            ll = logLikelihoodSum / dates;
        }
        return new Scores(eq, sg, rd, mv, ll, series);
    }

    private static Family family(BiasStatistics.Moments m) {
        int n = m.count();
        return new Family(finite(m.sd()), n < 2 ? null : BiasStatistics.band(n), n, finite(m.qlike()));
    }

    private static Spread spread(BiasStatistics.Moments[] ms) {
        double[] b = new double[ms.length];
        int count = 0;
        int inside = 0;
        double qSum = 0;
        int qCount = 0;
        for (BiasStatistics.Moments m : ms) {
            qSum += m.qSum();
            qCount += m.qCount();
            if (m.count() < 2) continue;
            double sd = m.sd();
            b[count++] = sd;
            double[] band = BiasStatistics.band(m.count());
            if (sd >= band[0] && sd <= band[1]) inside++;
        }
        return new Spread(count == 0 ? null : BiasStatistics.median(b, count), count == 0 ? null : (double) inside / count, count,
                qCount == 0 ? null : qSum / qCount);
    }

    private static Double finite(double v) {
        return Double.isFinite(v) ? v : null;
    }
}
