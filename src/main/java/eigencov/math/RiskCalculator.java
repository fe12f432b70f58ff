package eigencov.math;

/**
 * Covariance submatrices and portfolio risk straight from the factor form: O(|S| k) and
 * O(|S|^2 k), never K x K. Temporary copy of the agreed math API; the engine's version replaces it
 * at merge.
 */
public final class RiskCalculator {
    private RiskCalculator() {
    }

    /**
     * {@code scale * (B_S F B_S' + D_S)} for the model rows {@code idx}, |S| x |S| row-major; with
     * {@code correlation} the correlation matrix instead (scale then cancels). Not modified: all arguments.
     */
    public static double[] covariance(FactorModel m, int[] idx, double scale, boolean correlation) {
        int n = idx.length;
        int k = m.factors();
        double[] b = m.exposuresView();
        double[] f = m.factorCovarianceView();
        double[] bf = new double[n * k];          // B_S F, n x k
        for (int r = 0; r < n; r++) {
            int src = idx[r] * k;
            for (int a = 0; a < k; a++) {
                double bra = b[src + a];
                if (bra == 0) continue;
                int fa = a * k;
                for (int c = 0; c < k; c++) bf[r * k + c] += bra * f[fa + c];
            }
        }
        double[] out = new double[n * n];
        for (int r = 0; r < n; r++) {
            int rk = r * k;
            for (int c = r; c < n; c++) {
                int ck = idx[c] * k;
                double s = 0;
                for (int a = 0; a < k; a++) s += bf[rk + a] * b[ck + a];
                if (c == r) s += m.specificVariance(idx[r]);
                out[r * n + c] = s * scale;
                out[c * n + r] = s * scale;
            }
        }
        if (correlation) {
            double[] inv = new double[n];
            for (int r = 0; r < n; r++) inv[r] = out[r * n + r] > 0 ? 1 / Math.sqrt(out[r * n + r]) : 0;
            for (int r = 0; r < n; r++) {
                for (int c = 0; c < n; c++) out[r * n + c] *= inv[r] * inv[c];
                out[r * n + r] = inv[r] > 0 ? 1.0 : 0.0;
            }
        }
        return out;
    }

    /**
     * Risk of the portfolio {@code weights} (aligned with {@code idx}); tracking error against
     * {@code benchmarkWeights} (aligned with {@code benchIdx}) when the benchmark is not null.
     */
    public static PortfolioRisk portfolio(FactorModel m, int[] idx, double[] weights, int[] benchIdx,
                                          double[] benchmarkWeights, double scale) {
        int n = idx.length;
        int k = m.factors();
        double[] x = exposures(m, idx, weights);
        double[] fx = times(m, x);
        double factorVar = 0;
        for (int a = 0; a < k; a++) factorVar += x[a] * fx[a];
        double specVar = 0;
        double[] cw = new double[n];               // (C w)_i = (B F x)_i + d_i w_i
        for (int r = 0; r < n; r++) {
            int i = idx[r];
            double s = 0;
            for (int a = 0; a < k; a++) s += m.exposure(i, a) * fx[a];
            double dw = m.specificVariance(i) * weights[r];
            specVar += dw * weights[r];
            cw[r] = s + dw;
        }
        double variance = (factorVar + specVar) * scale;
        double vol = Math.sqrt(variance);
        double root = Math.sqrt(scale);
        double[] marginal = new double[n];
        double[] contribution = new double[n];
        double[] specific = new double[n];
        double[] byFactor = new double[k];
        if (vol > 0) {
            for (int r = 0; r < n; r++) {
                marginal[r] = cw[r] * scale / vol;
                contribution[r] = weights[r] * marginal[r];
                specific[r] = m.specificVariance(idx[r]) * weights[r] * weights[r] * scale / vol;
            }
            for (int a = 0; a < k; a++) byFactor[a] = x[a] * fx[a] * scale / vol;
        }
        Double te = null;
        if (benchmarkWeights != null) {
            te = activeVolatility(m, idx, weights, benchIdx, benchmarkWeights) * root;
        }
        double f11 = m.factorCov(0, 0);
        double[] assetBeta = new double[n];
        for (int r = 0; r < n; r++) assetBeta[r] = f11 > 0 ? cwFirst(m, idx[r]) / f11 : 0;
        double beta = 0;
        for (int r = 0; r < n; r++) beta += weights[r] * assetBeta[r];
        return new PortfolioRisk(variance, vol, factorVar * scale, specVar * scale, x, byFactor, marginal,
                contribution, specific, te, beta, assetBeta);
    }

    /** (B F)_{i,0}: covariance of asset i with the first factor. */
    private static double cwFirst(FactorModel m, int i) {
        double s = 0;
        for (int a = 0; a < m.factors(); a++) s += m.exposure(i, a) * m.factorCov(a, 0);
        return s;
    }

    private static double[] exposures(FactorModel m, int[] idx, double[] w) {
        int k = m.factors();
        double[] x = new double[k];
        for (int r = 0; r < idx.length; r++) {
            for (int a = 0; a < k; a++) x[a] += m.exposure(idx[r], a) * w[r];
        }
        return x;
    }

    private static double[] times(FactorModel m, double[] x) {
        int k = m.factors();
        double[] fx = new double[k];
        for (int a = 0; a < k; a++) {
            for (int c = 0; c < k; c++) fx[a] += m.factorCov(a, c) * x[c];
        }
        return fx;
    }

    private static double activeVolatility(FactorModel m, int[] idx, double[] w, int[] bIdx, double[] bw) {
        java.util.Map<Integer, Double> active = new java.util.LinkedHashMap<>();
        for (int r = 0; r < idx.length; r++) active.merge(idx[r], w[r], Double::sum);
        for (int r = 0; r < bIdx.length; r++) active.merge(bIdx[r], -bw[r], Double::sum);
        int[] ai = new int[active.size()];
        double[] aw = new double[active.size()];
        int p = 0;
        for (var e : active.entrySet()) {
            ai[p] = e.getKey();
            aw[p++] = e.getValue();
        }
        return portfolio(m, ai, aw, null, null, 1.0).volatility();
    }
}
