package eigencov.math;

import java.util.HashMap;
import java.util.Map;

/**
 * Risk numbers read from the factor form only (docs/code-style.md practice 9): a covariance submatrix costs
 * O(|S|^2 k), a portfolio O(|S| k + k^2); the K x K matrix is never built.
 */
public final class RiskCalculator {
    /** Side of the square tiles a matrix is mirrored in (32 x 32 doubles = 8 KB, fits L1). */
    private static final int MIRROR_TILE = 32;

    private RiskCalculator() {
    }

    /**
     * Covariance submatrix {@code C[S,S] = B_S F B_S' + D_S} times {@code scale}, for model rows idx
     * (|S| x |S| row-major, exactly symmetric: one triangle is computed and mirrored). With {@code correlation} returns
     * {@code C_ab / sqrt(C_aa C_bb)} instead (scale cancels); a name with zero variance gets
     * correlation 0 with the others and 1 with itself.
     */
    public static double[] covariance(FactorModel m, int[] idx, double scale, boolean correlation) {
        checkIndices(m, idx, "idx");
        checkScale(scale);
        int n = idx.length;
        int k = m.factors();
        double[] b = m.exposuresView();
        double[] f = m.factorCovarianceView();
        double[] d = m.specificView();
        // L = B_S F (|S| x k), R = B_S; C = L R' (+ D). With diagonal F use B_S sqrt(F) on both sides.
        // R is kept transposed (k x |S|): row a of the lower triangle is then k contiguous axpys of its
        // rows added in factor order (vector FMAs when the vector kernels are on), so entry (a, c) is
        // the sum over the factors in index order, whatever the other tickers of the request.
        double[] l = new double[n * k];
        double[] rt = new double[k * n];
        boolean diagonal = m.diagonalFactorCovariance();
        for (int a = 0; a < n; a++) {
            int bo = idx[a] * k;
            int o = a * k;
            if (diagonal) {
                for (int c = 0; c < k; c++) {
                    double g = b[bo + c] * Math.sqrt(f[c * k + c]);
                    l[o + c] = g;
                    rt[c * n + a] = g;
                }
            } else {
                for (int c = 0; c < k; c++) {
                    double s = 0;
                    for (int e = 0; e < k; e++) {
                        s += b[bo + e] * f[e * k + c];
                    }
                    l[o + c] = s;
                    rt[c * n + a] = b[bo + c];
                }
            }
        }
        double[] out = new double[n * n];
        for (int a = 0; a < n; a++) {
            int lo = a * k;
            int row = a * n;
            for (int e = 0; e < k; e++) {
                Dense.axpy(l[lo + e] * scale, rt, e * n, out, row, a + 1);
            }
            out[row + a] += d[idx[a]] * scale;
        }
        if (correlation) {
            // scale the lower triangle only; the mirror below copies it, so that C_ab and C_ba are the
            // same bits (scaling both would round (x inv_a) inv_b and (x inv_b) inv_a differently)
            double[] inv = new double[n];
            for (int a = 0; a < n; a++) {
                double v = out[a * n + a];
                inv[a] = v > 0 ? 1.0 / Math.sqrt(v) : 0;
            }
            for (int a = 0; a < n; a++) {
                int row = a * n;
                double ia = inv[a];
                for (int c = 0; c < a; c++) {
                    out[row + c] = out[row + c] * ia * inv[c];
                }
                out[row + a] = 1.0;
            }
        }
        mirrorLowerTriangle(out, n);
        return out;
    }

    /**
     * Copies the lower triangle of the n x n row-major {@code m} onto the upper one, tile by tile so
     * that the column-wise writes stay in cache. Modifies {@code m}.
     */
    static void mirrorLowerTriangle(double[] m, int n) {
        for (int ab = 0; ab < n; ab += MIRROR_TILE) {
            int aEnd = Math.min(ab + MIRROR_TILE, n);
            for (int cb = 0; cb <= ab; cb += MIRROR_TILE) {
                for (int a = ab; a < aEnd; a++) {
                    int cEnd = Math.min(cb + MIRROR_TILE, a);
                    for (int c = cb; c < cEnd; c++) {
                        m[c * n + a] = m[a * n + c];
                    }
                }
            }
        }
    }

    /**
     * Risk of the portfolio {@code weights} on model rows idx, and tracking error against an optional
     * benchmark (benchIdx, benchmarkWeights; both null for none). Variance {@code (B'w)'F(B'w) + sum d_i w_i^2}
     * times scale; a zero portfolio has volatility 0 and zero contributions (not NaN). {@code betas} holds each
     * model row's beta to the first factor ({@link FirstFactorBeta#betas}, computed once per fit); the
     * portfolio's beta is {@code w'beta}.
     */
    public static PortfolioRisk portfolio(FactorModel m, int[] idx, double[] weights, int[] benchIdx,
                                          double[] benchmarkWeights, double scale, double[] betas) {
        checkIndices(m, idx, "idx");
        checkWeights(idx, weights, "weights");
        checkScale(scale);
        if ((benchIdx == null) != (benchmarkWeights == null)) {
            throw new IllegalArgumentException("benchIdx and benchmarkWeights must both be given or both be null");
        }
        if (betas == null || betas.length != m.size()) {
            throw new IllegalArgumentException("betas must hold one value per model row (" + m.size() + ")");
        }
        Decomposition p = decompose(m, idx, weights, scale);
        double[] assetBetas = new double[idx.length];
        double beta = 0;
        for (int a = 0; a < idx.length; a++) {
            assetBetas[a] = betas[idx[a]];
            beta += weights[a] * assetBetas[a];
        }
        ActiveRisk active = null;
        Double te = null;
        if (benchIdx != null) {
            checkIndices(m, benchIdx, "benchIdx");
            checkWeights(benchIdx, benchmarkWeights, "benchmarkWeights");
            Map<Integer, Integer> pos = new HashMap<>();
            int[] union = new int[idx.length + benchIdx.length];
            double[] act = new double[union.length];
            int u = 0;
            for (int a = 0; a < idx.length; a++) {
                pos.put(idx[a], u);
                union[u] = idx[a];
                act[u++] = weights[a];
            }
            for (int a = 0; a < benchIdx.length; a++) {
                Integer at = pos.get(benchIdx[a]);
                if (at == null) {
                    union[u] = benchIdx[a];
                    act[u++] = -benchmarkWeights[a];
                } else {
                    act[at] -= benchmarkWeights[a];
                }
            }
            union = java.util.Arrays.copyOf(union, u);
            act = java.util.Arrays.copyOf(act, u);
            Decomposition q = decompose(m, union, act, scale);
            active = new ActiveRisk(union, act, q.variance, q.vol, q.exposures, q.factorContributions, q.marginal,
                    q.contribution, q.specificContributions);
            te = q.vol;
        }
        return new PortfolioRisk(p.variance, p.vol, p.factorVariance, p.specificVariance, p.exposures,
                p.factorContributions, p.marginal, p.contribution, p.specificContributions, te, beta, assetBetas, active);
    }

    /** Volatility only, the hot path of many small queries: O(|S| k + k^2), no allocation beyond k doubles. */
    public static double volatility(FactorModel m, int[] idx, double[] weights, double scale) {
        int k = m.factors();
        double[] b = m.exposuresView();
        double[] d = m.specificView();
        double[] x = new double[k];
        double spec = 0;
        for (int a = 0; a < idx.length; a++) {
            double wa = weights[a];
            int bo = idx[a] * k;
            for (int c = 0; c < k; c++) {
                x[c] += b[bo + c] * wa;
            }
            spec += d[idx[a]] * wa * wa;
        }
        return Math.sqrt(Math.max(0, quadratic(m, x) + spec) * scale);
    }

    private static double quadratic(FactorModel m, double[] x) {
        int k = x.length;
        double[] f = m.factorCovarianceView();
        double s = 0;
        for (int a = 0; a < k; a++) {
            double fx = 0;
            for (int c = 0; c < k; c++) {
                fx += f[a * k + c] * x[c];
            }
            s += x[a] * fx;
        }
        return s;
    }

    /** Risk of one weight vector; package-private for {@link FirstFactorBeta}, which reads marginal and vol. */
    static final class Decomposition {
        double variance;
        double vol;
        double factorVariance;
        double specificVariance;
        double[] exposures;
        double[] factorContributions;
        double[] marginal;
        double[] contribution;
        double[] specificContributions;
    }

    static Decomposition decompose(FactorModel m, int[] idx, double[] w, double scale) {
        int k = m.factors();
        int n = idx.length;
        double[] b = m.exposuresView();
        double[] f = m.factorCovarianceView();
        double[] d = m.specificView();
        double[] x = new double[k];
        double spec = 0;
        for (int a = 0; a < n; a++) {
            int bo = idx[a] * k;
            double wa = w[a];
            for (int c = 0; c < k; c++) {
                x[c] += b[bo + c] * wa;
            }
            spec += d[idx[a]] * wa * wa;
        }
        double[] fx = new double[k];
        double fv = 0;
        for (int a = 0; a < k; a++) {
            double s = 0;
            for (int c = 0; c < k; c++) {
                s += f[a * k + c] * x[c];
            }
            fx[a] = s;
            fv += x[a] * s;
        }
        fv = Math.max(0, fv);
        Decomposition r = new Decomposition();
        r.exposures = x;
        r.factorVariance = fv * scale;
        r.specificVariance = spec * scale;
        r.variance = r.factorVariance + r.specificVariance;
        r.vol = Math.sqrt(r.variance);
        double inv = r.vol > 0 ? scale / r.vol : 0;
        r.factorContributions = new double[k];
        for (int c = 0; c < k; c++) {
            r.factorContributions[c] = x[c] * fx[c] * inv;
        }
        r.marginal = new double[n];
        r.contribution = new double[n];
        r.specificContributions = new double[n];
        for (int a = 0; a < n; a++) {
            int bo = idx[a] * k;
            double cw = 0;
            for (int c = 0; c < k; c++) {
                cw += b[bo + c] * fx[c];
            }
            double dw = d[idx[a]] * w[a];
            cw += dw;
            r.marginal[a] = cw * inv;
            r.contribution[a] = w[a] * cw * inv;
            r.specificContributions[a] = w[a] * dw * inv;
        }
        return r;
    }

    private static void checkIndices(FactorModel m, int[] idx, String name) {
        if (idx == null) {
            throw new IllegalArgumentException(name + " must not be null");
        }
        boolean[] seen = new boolean[m.size()];
        for (int a = 0; a < idx.length; a++) {
            if (idx[a] < 0 || idx[a] >= m.size()) {
                throw new IllegalArgumentException(name + "[" + a + "] = " + idx[a] + " is outside the model's "
                        + m.size() + " tickers");
            }
            if (seen[idx[a]]) {
                throw new IllegalArgumentException(name + "[" + a + "] repeats ticker '" + m.tickers().get(idx[a])
                        + "'");
            }
            seen[idx[a]] = true;
        }
    }

    private static void checkWeights(int[] idx, double[] w, String name) {
        if (w == null || w.length != idx.length) {
            throw new IllegalArgumentException(name + " length " + (w == null ? "null" : w.length) + " != "
                    + idx.length + " tickers");
        }
        for (int a = 0; a < w.length; a++) {
            if (!Double.isFinite(w[a])) {
                throw new IllegalArgumentException(name + "[" + a + "] is not finite");
            }
        }
    }

    private static void checkScale(double scale) {
        if (!(scale > 0) || Double.isInfinite(scale)) {
            throw new IllegalArgumentException("scale must be positive and finite, was " + scale);
        }
    }
}
