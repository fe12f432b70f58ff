package eigencov.math;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.time.LocalDate;
import java.util.ArrayList;
import java.util.List;
import java.util.Random;
import org.junit.jupiter.api.Test;

/**
 * Evaluation statistics on seeded simulations with known truth (docs/methods.md section 10): a correct
 * forecast is inside its bias band, a forecast of a quarter of the variance shows b near 2, the true
 * covariance gives the lowest out-of-sample minimum-variance volatility (Engle and Colacito, 2006), and
 * the sample covariance has the published noise signature (q = K/T: in-sample minimum variance about
 * (1 - q) x true, out of sample about true / (1 - q); Pafka and Kondor, 2003, as docs/methods.md states).
 */
class EvaluationSimulationTest {

    /** A 3-factor truth on {@code names} names with its returns for {@code dates} dates. */
    private record Truth(FactorModel model, double[] returns, int dates, int names) {
        double[] row(int t) {
            return java.util.Arrays.copyOfRange(returns, t * names, (t + 1) * names);
        }

        double[] window(int from, int to) {
            return java.util.Arrays.copyOfRange(returns, from * names, to * names);
        }
    }

    private static Truth simulate(int names, int dates, long seed) {
        Random rnd = new Random(seed);
        int k = 3;
        double[] b = new double[names * k];
        double[] d = new double[names];
        for (int i = 0; i < names; i++) {
            b[i * k] = 0.8 + 0.4 * rnd.nextDouble();
            b[i * k + 1] = rnd.nextGaussian() * 0.5;
            b[i * k + 2] = rnd.nextGaussian() * 0.5;
            d[i] = Math.pow(0.01 + 0.01 * rnd.nextDouble(), 2);
        }
        double[] f = {1e-4, 2.5e-5, 1.6e-5};
        double[] r = new double[dates * names];
        for (int t = 0; t < dates; t++) {
            double[] ft = new double[k];
            for (int j = 0; j < k; j++) ft[j] = Math.sqrt(f[j]) * rnd.nextGaussian();
            for (int i = 0; i < names; i++) {
                double x = Math.sqrt(d[i]) * rnd.nextGaussian();
                for (int j = 0; j < k; j++) x += b[i * k + j] * ft[j];
                r[t * names + i] = x;
            }
        }
        double[] fm = {f[0], 0, 0, 0, f[1], 0, 0, 0, f[2]};
        List<String> tickers = new ArrayList<>();
        for (int i = 0; i < names; i++) tickers.add("N" + i);
        return new Truth(new FactorModel(tickers, k, b, fm, d), r, dates, names);
    }

    private static int[] all(int n) {
        int[] a = new int[n];
        for (int i = 0; i < n; i++) a[i] = i;
        return a;
    }

    private static FactorModel scaled(FactorModel m, double s) {
        double[] f = m.factorCovariance();
        double[] d = m.specificVariances();
        for (int p = 0; p < f.length; p++) f[p] *= s;
        for (int i = 0; i < d.length; i++) d[i] *= s;
        return new FactorModel(m.tickers(), m.factors(), m.exposures(), f, d);
    }

    /** Scores {@code forecast} one day ahead on every date of the truth, with 50 random 10-name portfolios. */
    private static ForecastScores.Scores score(Truth truth, FactorModel forecast) {
        int n = truth.names();
        List<RandomPortfolios.Portfolio> random = RandomPortfolios.draw(n, 50, 10, 1);
        int[][] members = new int[random.size()][];
        double[][] weights = new double[random.size()][];
        for (int p = 0; p < random.size(); p++) {
            members[p] = random.get(p).members();
            weights[p] = random.get(p).weights();
        }
        ForecastScores s = new ForecastScores(1, n, random.size());
        FactorForecast c = new FactorForecast(forecast, all(n));
        for (int t = 0; t < truth.dates(); t++) {
            s.add(LocalDate.of(2024, 1, 1).plusDays(t), c, truth.row(t), all(n), members, weights);
        }
        return s.result();
    }

    @Test
    void the_true_covariance_is_inside_its_band_and_about_95_percent_of_single_names_are() {
        Truth truth = simulate(200, 252, 42);
        ForecastScores.Scores s = score(truth, truth.model());
        double[] band = BiasStatistics.band(252);
        assertTrue(s.equal().bias() >= band[0] && s.equal().bias() <= band[1], "equal bias " + s.equal().bias() + " in " + band[0] + ".." + band[1]);
        // about 95 % of 200 names (binomial sd 1.5 points; the names share factors, so allow 7 points)
        assertEquals(0.95, s.single().insideBand(), 0.07, "share of single names inside their band");
        assertEquals(0.95, s.random().insideBand(), 0.10, "share of 50 random portfolios inside their band");
        assertEquals(1.0, s.single().median(), 0.03, "median single-name bias");
        // docs/methods.md section 10: under a perfect Gaussian model E[z^2 - ln z^2] = 1 + gamma + ln 2 = 2.2704
        assertEquals(2.2704, s.single().qlike(), 0.05, "mean QLIKE term over 50,400 single-name outcomes");
    }

    @Test
    void a_forecast_of_a_quarter_of_the_variance_shows_a_bias_near_2() {
        Truth truth = simulate(200, 252, 43);
        ForecastScores.Scores s = score(truth, scaled(truth.model(), 0.25));
        double[] band = BiasStatistics.band(252);
        assertTrue(s.equal().bias() >= 2 * band[0] && s.equal().bias() <= 2 * band[1], "equal bias " + s.equal().bias() + " near 2");
        assertEquals(2.0, s.single().median(), 0.06, "median single-name bias");
        assertTrue(s.single().insideBand() < 0.01, "no single name is inside its band: " + s.single().insideBand());
        // the QLIKE term ranks the correct forecast first (its minimum over sigma is at the true variance)
        assertTrue(s.single().qlike() > score(truth, truth.model()).single().qlike());
    }

    @Test
    void the_true_covariance_gives_a_lower_minimum_variance_volatility_than_the_sample_covariance() {
        // Engle and Colacito (2006): the true covariance minimises the expected realised variance of the
        // minimum-variance portfolio. 50 names, rolling 100-date sample windows (q = 0.5), 250 forecast dates.
        int n = 50;
        int window = 100;
        Truth truth = simulate(n, window + 250, 44);
        ForecastScores trueScores = new ForecastScores(1, n, 0);
        ForecastScores sampleScores = new ForecastScores(1, n, 0);
        ForecastScores shrunkScores = new ForecastScores(1, n, 0);
        FactorForecast exact = new FactorForecast(truth.model(), all(n));
        double[] equal = EvaluationCheckValuesTest.equal(window);
        for (int t = window; t < truth.dates(); t++) {
            LocalDate date = LocalDate.of(2024, 1, 1).plusDays(t);
            WindowCovariance w = WindowCovariance.of(truth.window(t - window, t), window, n, equal, null);
            trueScores.add(date, exact, truth.row(t), all(n), null, null);
            sampleScores.add(date, w.sample(), truth.row(t), all(n), null, null);
            shrunkScores.add(date, w.ledoitWolf(), truth.row(t), all(n), null, null);
        }
        double exactVol = trueScores.result().minimumVariance().realisedVolatility();
        ForecastScores.MinimumVariance sample = sampleScores.result().minimumVariance();
        assertNotNull(sample, "50 names < 100 dates: the sample covariance is invertible");
        assertTrue(exactVol < sample.realisedVolatility(), exactVol + " < " + sample.realisedVolatility());
        assertTrue(exactVol < shrunkScores.result().minimumVariance().realisedVolatility());
        // noise signature (docs/methods.md section 10): the sample's minimum-variance forecast is about (1 - q) of the
        // truth and its realised variance about truth / (1 - q), so its bias statistic is near 1 / (1 - q) = 2
        assertEquals(2.0, sample.bias(), 0.3, "sample minimum-variance bias at q = 0.5");
        // the truth's minimum-variance portfolio is forecast correctly
        double[] band = BiasStatistics.band(250);
        double b = trueScores.result().minimumVariance().bias();
        assertTrue(b >= band[0] && b <= band[1], "true minimum-variance bias " + b);
    }

    @Test
    void sample_covariance_minimum_variance_has_the_noise_signature_at_q_one_quarter() {
        // docs/methods.md section 10, check: K = 100, T = 400 (q = 0.25), Sigma = I, 200 reps:
        // in-sample/true = 0.7497 (theory 0.75), out-of-sample/true = 1.3298 (theory 1.3333). Here 60 reps.
        int names = 100;
        int dates = 400;
        Random rnd = new Random(45);
        double in = 0;
        double out = 0;
        int reps = 60;
        double[] equal = EvaluationCheckValuesTest.equal(dates);
        for (int rep = 0; rep < reps; rep++) {
            double[] x = new double[dates * names];
            for (int p = 0; p < x.length; p++) x[p] = rnd.nextGaussian();
            CovarianceInverse inv = WindowCovariance.of(x, dates, names, equal, null).sample().inverse();
            double[] w = new double[names];
            double inSample = inv.minimumVariance(1.0, w);
            double trueVariance = 0; // w' I w
            for (double v : w) trueVariance += v * v;
            double truth = 1.0 / names; // the minimum variance of Sigma = I
            in += inSample / truth / reps;
            out += trueVariance / truth / reps;
        }
        // our divisor is T (not T - 1): the in-sample figure scales by (T-1)/T = 0.9975, inside the tolerance
        assertEquals(0.75, in, 0.02, "in-sample / true");
        assertEquals(4.0 / 3, out, 0.03, "out-of-sample / true");
    }
}
