package eigencov.math;

import java.util.LinkedHashMap;
import java.util.Map;

/**
 * Factor-count rules (docs/methods.md section 2). Each works on the non-zero eigenvalues of the
 * decomposed matrix (descending) and returns k with its evidence; k is clipped to [1, rank].
 * Where a rule needs the number of dates it uses the effective number T_eff (docs/methods.md
 * section 6), so half-life weights are accounted for.
 */
public final class FactorCount {

    private FactorCount() {
    }

    /**
     * Chooses k for {@code rule}.
     *
     * @param eigenvalues non-zero eigenvalues, descending (length = rank, at least 1)
     * @param assets      number of assets N (= K)
     * @param tEff        effective number of dates
     * @param trace       total variance (sum of all eigenvalues, including numerically zero ones)
     */
    public static FactorCountReport choose(FactorRule rule, double[] eigenvalues, int assets, double tEff,
                                           double trace) {
        int rank = eigenvalues.length;
        if (rank < 1) {
            throw new InsufficientDataException("no non-zero eigenvalue: the window has no variance");
        }
        if (rule instanceof FactorRule.Fixed f) {
            Map<String, Double> p = new LinkedHashMap<>();
            p.put("count", (double) f.count());
            p.put("rank", (double) rank);
            return report(rule, f.count(), rank, "eigenvalue", 1, eigenvalues, p);
        }
        if (rule instanceof FactorRule.VarianceShare v) {
            return varianceShare(v, eigenvalues, trace);
        }
        if (rule instanceof FactorRule.BaiNg b) {
            return baiNg(b, eigenvalues, assets, tEff);
        }
        if (rule instanceof FactorRule.EigenvalueRatio e) {
            return eigenvalueRatio(e, eigenvalues);
        }
        return randomMatrix((FactorRule.RandomMatrix) rule, eigenvalues, assets, tEff, trace);
    }

    /**
     * Bai and Ng (2002) penalties {g1, g2, g3} for N assets and T dates:
     * g1 = ((N+T)/(NT)) ln(NT/(N+T)), g2 = ((N+T)/(NT)) ln min(N,T), g3 = ln(min(N,T)) / min(N,T).
     */
    public static double[] baiNgPenalties(double n, double t) {
        double c2 = Math.min(n, t);
        double a = (n + t) / (n * t);
        return new double[] {a * Math.log(n * t / (n + t)), a * Math.log(c2), Math.log(c2) / c2};
    }

    /**
     * Marchenko and Pastur (1967) support {lower, upper} = sigma2 (1 -/+ sqrt(q))^2, q = K / T, of the
     * spectrum of a K-asset sample covariance of T i.i.d. observations with variance sigma2.
     */
    public static double[] marchenkoPasturEdges(double sigma2, double assets, double dates) {
        double sq = Math.sqrt(assets / dates);
        return new double[] {sigma2 * (1 - sq) * (1 - sq), sigma2 * (1 + sq) * (1 + sq)};
    }

    private static FactorCountReport varianceShare(FactorRule.VarianceShare rule, double[] ev, double trace) {
        double[] cum = new double[ev.length];
        double s = 0;
        int k = ev.length;
        boolean found = false;
        for (int j = 0; j < ev.length; j++) {
            s += ev[j];
            cum[j] = s / trace;
            // 1e-12: a share reached up to rounding counts as reached
            if (!found && cum[j] >= rule.share() - 1e-12) {
                k = j + 1;
                found = true;
            }
        }
        Map<String, Double> p = new LinkedHashMap<>();
        p.put("share", rule.share());
        p.put("totalVariance", trace);
        return report(rule, k, ev.length, "cumulative variance share", 1, cum, p);
    }

    private static FactorCountReport baiNg(FactorRule.BaiNg rule, double[] ev, int assets, double tEff) {
        int rank = ev.length;
        int kmax = Math.min(rule.max(), rank - 1);
        Map<String, Double> p = new LinkedHashMap<>();
        double g2 = baiNgPenalties(assets, tEff)[1];
        p.put("max", (double) rule.max());
        p.put("kmax", (double) Math.max(kmax, 0));
        p.put("penalty", g2);
        p.put("N", (double) assets);
        p.put("T", tEff);
        if (kmax < 1) {
            return report(rule, 1, 1, "IC_p2(k)", 0, new double[0], p);
        }
        // V(k) = (1/N) sum_{j>k} lambda_j: the residual mean square, up to a constant that only shifts ln V
        double[] tail = new double[rank + 1];
        for (int j = rank - 1; j >= 0; j--) {
            tail[j] = tail[j + 1] + ev[j];
        }
        double[] ic = new double[kmax + 1];
        int best = 0;
        for (int k = 0; k <= kmax; k++) {
            ic[k] = Math.log(tail[k] / assets) + k * g2;
            if (ic[k] < ic[best]) {
                best = k;
            }
        }
        return report(rule, best, rank, "IC_p2(k)", 0, ic, p);
    }

    private static FactorCountReport eigenvalueRatio(FactorRule.EigenvalueRatio rule, double[] ev) {
        int rank = ev.length;
        int kmax = Math.min(rule.max(), rank - 1);
        Map<String, Double> p = new LinkedHashMap<>();
        p.put("max", (double) rule.max());
        p.put("kmax", (double) Math.max(kmax, 0));
        if (kmax < 1) {
            return report(rule, 1, 1, "lambda_k / lambda_k+1", 1, new double[0], p);
        }
        double[] er = new double[kmax];
        int best = 0;
        for (int k = 1; k <= kmax; k++) {
            er[k - 1] = ev[k - 1] / ev[k];
            if (er[k - 1] > er[best]) {
                best = k - 1;
            }
        }
        return report(rule, best + 1, rank, "lambda_k / lambda_k+1", 1, er, p);
    }

    /**
     * Tracy-Widom (beta = 1) 99 % quantile, used as the margin above the edge: 2.02 (from memory,
     * Johnstone 2001, Table 1). Without a margin the largest pure-noise eigenvalue crosses the bare
     * edge in about one panel in six (src/test/resources/reference/marchenko_pastur/SOURCE.md), which
     * would add a spurious factor.
     */
    public static final double TRACY_WIDOM_99 = 2.02;

    /**
     * Johnstone (2001) finite-size threshold for the largest noise eigenvalue of a K-asset covariance
     * from n dates with unit noise variance: centre (sqrt(n-1) + sqrt(K))^2 / n plus {@code quantile}
     * times the scale (sqrt(n-1) + sqrt(K)) (1/sqrt(n-1) + 1/sqrt(K))^(1/3) / n.
     */
    public static double johnstoneThreshold(double assets, double dates, double quantile) {
        double a = Math.sqrt(Math.max(dates - 1, 1));
        double b = Math.sqrt(assets);
        double centre = (a + b) * (a + b) / dates;
        double scale = (a + b) * Math.cbrt(1 / a + 1 / b) / dates;
        return centre + quantile * scale;
    }

    /**
     * Counts eigenvalues above the Marchenko-Pastur upper edge of the residual spectrum,
     * sigma2 max((1 + sqrt(K/T_eff))^2, Johnstone's 99 % Tracy-Widom threshold), where sigma2 is the mean
     * of the residual spectrum (trace minus the counted eigenvalues, over K - k), iterated until the
     * count is stable (with k = 0 this is trace/K; for a correlation matrix after removing the first
     * factor it is 1 - lambda_1/K, docs/methods.md section 2).
     */
    private static FactorCountReport randomMatrix(FactorRule.RandomMatrix rule, double[] ev, int assets,
                                                  double tEff, double trace) {
        double unitEdge = marchenkoPasturEdges(1, assets, tEff)[1];
        double unitThreshold = Math.max(unitEdge, johnstoneThreshold(assets, tEff, TRACY_WIDOM_99));
        int k = 0;
        double sigma2 = 0;
        int iterations = 0;
        while (iterations < 100) {
            iterations++;
            double top = 0;
            for (int j = 0; j < k; j++) {
                top += ev[j];
            }
            sigma2 = assets > k ? Math.max(0, trace - top) / (assets - k) : 0;
            double threshold = sigma2 * unitThreshold;
            int count = 0;
            while (count < ev.length && ev[count] > threshold) {
                count++;
            }
            if (count == k) {
                break;
            }
            k = count;
        }
        double threshold = sigma2 * unitThreshold;
        double[] ratio = new double[ev.length];
        for (int j = 0; j < ev.length; j++) {
            ratio[j] = threshold > 0 ? ev[j] / threshold : Double.MAX_VALUE;
        }
        Map<String, Double> p = new LinkedHashMap<>();
        p.put("sigma2", sigma2);
        p.put("edge", sigma2 * unitEdge);
        p.put("threshold", threshold);
        p.put("q", assets / tEff);
        p.put("T", tEff);
        p.put("iterations", (double) iterations);
        return report(rule, k, ev.length, "lambda_k / threshold", 1, ratio, p);
    }

    private static FactorCountReport report(FactorRule rule, int unclipped, int rank, String criterion, int firstK,
                                            double[] values, Map<String, Double> parameters) {
        int k = Math.max(1, Math.min(rank, unclipped));
        return new FactorCountReport(rule.name(), k, unclipped, criterion, firstK, values, parameters);
    }
}
