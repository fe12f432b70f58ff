package eigencov.math;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import java.util.Random;
import java.util.stream.Stream;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.Arguments;
import org.junit.jupiter.params.provider.MethodSource;

/** Factor-count rules on planted structure and on pure noise (Marchenko-Pastur law). */
class FactorRulesTest {

    /** docs/methods.md section 2 property: X = F L' + E, N=200, T=150, r=3, all entries N(0,1). */
    static final int T = 150;
    static final int N = 200;
    static final int R = 3;

    static double[][] plantedPanel() {
        return Fixtures.planted(T, N, R, 1.0, 2024);
    }

    /** Population variance share of r factors: eigenvalues of L L' + I over tr(L L') + N. */
    static double populationShare(double[] l, int r) {
        double[] g = new double[R * R]; // L'L has the non-zero eigenvalues of L L'
        for (int a = 0; a < R; a++) {
            for (int b = 0; b < R; b++) {
                for (int i = 0; i < N; i++) {
                    g[a * R + b] += l[i * R + a] * l[i * R + b];
                }
            }
        }
        double[] ev = EjmlOracleTest.ejml(g, R)[0];
        double trace = ev[0] + ev[1] + ev[2] + N;
        double top = r;
        for (int j = 0; j < r; j++) {
            top += ev[j];
        }
        return top / trace;
    }

    static Stream<Arguments> rules() {
        double[] l = plantedPanel()[1];
        // halfway between the population shares of 2 and 3 factors
        double share = 0.5 * (populationShare(l, 2) + populationShare(l, 3));
        return Stream.of(Arguments.of(new FactorRule.BaiNg(8)), Arguments.of(new FactorRule.EigenvalueRatio(8)),
                Arguments.of(new FactorRule.RandomMatrix()), Arguments.of(new FactorRule.VarianceShare(share)),
                Arguments.of(new FactorRule.Fixed(3)));
    }

    @ParameterizedTest(name = "{0}")
    @MethodSource("rules")
    void each_rule_chooses_the_planted_three_factors(FactorRule rule) {
        double[][] p = plantedPanel();
        FitResult r = new FactorFitter(null).fit(Fixtures.panel(T, N, p[0]), FitOptions.of(rule, 1.0), null);
        assertEquals(R, r.factorCount().k(), rule + " evidence " + java.util.Arrays.toString(r.factorCount().values()));
        assertEquals(rule.name(), r.factorCount().rule());
        // principal angles between estimated and planted loading spaces: noise 1 against factor eigenvalues of
        // about N = 200 gives angles of a few degrees; 10 degrees is the stated bound
        double angle = Fixtures.largestPrincipalAngleDegrees(r.model().exposures(), N, R, p[1], R);
        assertTrue(angle < 10, "largest principal angle " + angle);
    }

    @Test
    void rules_report_their_evidence_per_k() {
        double[][] p = plantedPanel();
        FitResult r = new FactorFitter(null).fit(Fixtures.panel(T, N, p[0]),
                FitOptions.of(new FactorRule.BaiNg(8), 1.0), null);
        FactorCountReport c = r.factorCount();
        assertEquals(0, c.firstK());
        assertEquals(9, c.values().length, "IC_p2 for k = 0..8");
        double[] ic = c.values();
        for (int k = 0; k < ic.length; k++) {
            assertTrue(ic[3] <= ic[k], "IC_p2 minimal at 3");
        }
        assertEquals(FactorCount.baiNgPenalties(N, T)[1], c.parameters().get("penalty"), 1e-15);
    }

    @Test
    void pure_noise_spectrum_follows_marchenko_pastur() {
        // src/test/resources/reference/marchenko_pastur/SOURCE.md:
        // T=1000, K=250 (q=0.25, sigma2=1): bounds [0.25, 2.25]; over 300 panels the
        // largest eigenvalue ranged 2.1639..2.3136 and the smallest 0.2322..0.2722 (demeaned, divisor T-1);
        // a single panel's eigenvalue CDF was 0.0094 from the MP CDF in Kolmogorov distance
        JsonNode ref = Fixtures.json("marchenko_pastur", "mp_reference.json").get("empirical_replicates_T1000_K250");
        double[] largest = Fixtures.doubles(ref.get("largest_demeaned_n_minus_1_quantiles"));
        double[] smallest = Fixtures.doubles(ref.get("smallest_demeaned_n_minus_1_quantiles"));
        int t = 1000;
        int k = 250;
        Random rnd = new Random(20240101);
        double[] v = new double[t * k];
        for (int x = 0; x < v.length; x++) {
            v[x] = rnd.nextGaussian();
        }
        FitResult r = new FactorFitter(null).fit(Fixtures.panel(t, k, v),
                FitOptions.of(new FactorRule.RandomMatrix(), 1.0), null);
        double[] ev = r.eigenvalues();
        assertEquals(k, ev.length);
        double toN = (t - 1.0) / t; // the reference quantiles use divisor T-1
        assertTrue(ev[0] >= largest[0] * toN && ev[0] <= largest[4], "largest " + ev[0]);
        assertTrue(ev[k - 1] >= smallest[0] * toN && ev[k - 1] <= smallest[4], "smallest " + ev[k - 1]);
        double ks = kolmogorovDistanceToMp(ev, (double) k / t);
        assertTrue(ks < 0.02, "Kolmogorov distance " + ks);
        assertTrue(r.factorCount().unclipped() <= 1, "noise has no factor above the edge, at most a TW fluctuation");
        assertEquals(1, r.factorCount().k(), "clipped to at least one factor");
        double[] edges = FactorCount.marchenkoPasturEdges(1, k, t);
        assertEquals(2.25, edges[1], 1e-12);
        assertEquals(0.25, edges[0], 1e-12);
    }

    @Test
    void johnstone_centre_and_scale_match_the_reference_for_T1000_K250() {
        // marchenko_pastur/mp_reference.json, Johnstone (2001): mu = 2.2484999, sigma = 0.0216277
        JsonNode j = Fixtures.json("marchenko_pastur", "mp_reference.json").get("johnstone_2001_largest_eigenvalue_T1000_K250");
        double mu = FactorCount.johnstoneThreshold(250, 1000, 0);
        assertEquals(j.get("mu").asDouble(), mu, 1e-12);
        assertEquals(j.get("sigma").asDouble(), FactorCount.johnstoneThreshold(250, 1000, 1) - mu, 1e-12);
    }

    /** max |F_emp - F_MP| over the sample, F_MP by trapezoid integration of the MP density (sigma2 = 1). */
    static double kolmogorovDistanceToMp(double[] ev, double q) {
        double a = (1 - Math.sqrt(q)) * (1 - Math.sqrt(q));
        double b = (1 + Math.sqrt(q)) * (1 + Math.sqrt(q));
        int n = 200000;
        double h = (b - a) / n;
        double[] cdf = new double[n + 1];
        double prev = 0;
        for (int s = 1; s <= n; s++) {
            double x = a + s * h;
            double d = density(x, a, b, q);
            cdf[s] = cdf[s - 1] + 0.5 * h * (prev + d);
            prev = d;
        }
        double[] sorted = ev.clone();
        java.util.Arrays.sort(sorted);
        double worst = 0;
        for (int j = 0; j < sorted.length; j++) {
            int s = (int) Math.round((sorted[j] - a) / h);
            double f = s <= 0 ? 0 : s >= n ? 1 : cdf[s];
            worst = Math.max(worst, Math.max(Math.abs((j + 1.0) / sorted.length - f), Math.abs((double) j
                    / sorted.length - f)));
        }
        return worst;
    }

    private static double density(double x, double a, double b, double q) {
        double p = (b - x) * (x - a);
        return p <= 0 ? 0 : Math.sqrt(p) / (2 * Math.PI * q * x);
    }
}
