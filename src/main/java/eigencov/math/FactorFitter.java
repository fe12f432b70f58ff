package eigencov.math;

import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.EigenDecomposition;

import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.ExecutorService;

/**
 * Fits a PCA factor model on one window (temporary copy of the engine's API type so the service
 * compiles and runs before the engine is merged; the engine's version wins at merge). Gaps are
 * filled with the weighted mean of the ticker's observed returns here; the engine imputes by EM-PCA.
 */
public final class FactorFitter {
    /** Eigenvalues below this share of the largest are treated as zero. */
    private static final double RANK_TOL = 1e-12;

    public FactorFitter(ExecutorService poolOrNull) {
    }

    public FitResult fit(ReturnPanel window, FitOptions options, FactorModel previous) {
        long start = System.nanoTime();
        int rows = window.rows();
        if (rows < 2) throw new InsufficientDataException("window has " + rows + " dates; at least 2 are needed");
        int required = (int) Math.ceil(options.minCoverage() * rows);
        List<Integer> cols = new ArrayList<>();
        List<String> universe = new ArrayList<>();
        List<Exclusion> excluded = new ArrayList<>();
        for (int i = 0; i < window.cols(); i++) {
            int obs = 0;
            for (int t = 0; t < rows; t++) if (window.observed(t, i)) obs++;
            if (obs >= required && obs > 0) {
                cols.add(i);
                universe.add(window.tickers().get(i));
            } else {
                excluded.add(new Exclusion(window.tickers().get(i), obs, required, Exclusion.COVERAGE));
            }
        }
        int n = universe.size();
        if (n == 0) throw new InsufficientDataException("no ticker has the " + required + " observations required in a window of " + rows + " dates");
        double[] w = weights(rows, options.halfLifeDays());
        double[] x = new double[rows * n];
        double[] mu = new double[n];
        int imputed = 0;
        for (int c = 0; c < n; c++) {
            int i = cols.get(c);
            double sw = 0, sx = 0;
            for (int t = 0; t < rows; t++) {
                if (window.observed(t, i)) {
                    sw += w[t];
                    sx += w[t] * window.value(t, i);
                }
            }
            double fill = sx / sw;
            for (int t = 0; t < rows; t++) {
                boolean obs = window.observed(t, i);
                if (!obs) imputed++;
                x[t * n + c] = obs ? window.value(t, i) : fill;
            }
            double m = 0;
            for (int t = 0; t < rows; t++) m += w[t] * x[t * n + c];
            mu[c] = m;
        }
        double[][] s = new double[n][n];
        for (int t = 0; t < rows; t++) {
            for (int a = 0; a < n; a++) {
                double da = w[t] * (x[t * n + a] - mu[a]);
                for (int b = 0; b <= a; b++) s[a][b] += da * (x[t * n + b] - mu[b]);
            }
        }
        for (int a = 0; a < n; a++) for (int b = 0; b < a; b++) s[b][a] = s[a][b];
        double[] sigma = new double[n];
        for (int a = 0; a < n; a++) sigma[a] = Math.sqrt(s[a][a]);
        boolean corr = options.basis() == Basis.CORRELATION;
        double[][] m = new double[n][n];
        for (int a = 0; a < n; a++) {
            for (int b = 0; b < n; b++) {
                m[a][b] = corr ? (sigma[a] > 0 && sigma[b] > 0 ? s[a][b] / (sigma[a] * sigma[b]) : 0) : s[a][b];
            }
        }
        EigenDecomposition eig = new EigenDecomposition(new Array2DRowRealMatrix(m, false));
        double[] lambdaAll = eig.getRealEigenvalues();
        Integer[] order = new Integer[n];
        for (int j = 0; j < n; j++) order[j] = j;
        java.util.Arrays.sort(order, (p, q) -> Double.compare(lambdaAll[q], lambdaAll[p]));
        double top = lambdaAll[order[0]];
        if (!(top > 0)) throw new InsufficientDataException("the window has no variance");
        int rank = 0;
        double total = 0;
        for (int j = 0; j < n; j++) {
            double l = lambdaAll[order[j]];
            if (l > RANK_TOL * top) rank++;
            total += Math.max(l, 0);
        }
        double[] lambda = new double[rank];
        double[] share = new double[rank];
        for (int j = 0; j < rank; j++) {
            lambda[j] = lambdaAll[order[j]];
            share[j] = lambda[j] / total;
        }
        double[] criterion = criterion(options.rule(), lambda, total, n, rows);
        int k = chooseK(options.rule(), lambda, share, criterion, n, rows, total);
        k = Math.max(1, Math.min(k, rank));
        double[] e = new double[n * k];
        int flipped = 0;
        int common = 0;
        if (previous != null) {
            for (String tk : universe) if (previous.indexOf(tk) >= 0) common++;
        }
        for (int j = 0; j < k; j++) {
            double[] v = eig.getEigenvector(order[j]).toArray();
            double dot = 0;
            if (previous == null || j >= previous.factors()) {
                for (double vi : v) dot += vi;
            } else {
                for (int a = 0; a < n; a++) {
                    int p = previous.indexOf(universe.get(a));
                    if (p >= 0) dot += v[a] * previous.exposure(p, j);
                }
                if (dot < 0) flipped++;
            }
            double sign = dot < 0 ? -1 : 1;
            for (int a = 0; a < n; a++) e[a * k + j] = sign * v[a];
        }
        double[] exposures = new double[n * k];
        double[] spec = new double[n];
        for (int a = 0; a < n; a++) {
            double common2 = 0;
            for (int j = 0; j < k; j++) {
                double b = corr ? sigma[a] * e[a * k + j] : e[a * k + j];
                exposures[a * k + j] = b;
                common2 += b * b * lambda[j];
            }
            spec[a] = Math.max(s[a][a] - common2, options.specificFloor() * s[a][a]);
        }
        double[] f = new double[k * k];
        for (int j = 0; j < k; j++) f[j * k + j] = lambda[j];
        double[] fr = new double[rows * k];
        for (int t = 0; t < rows; t++) {
            for (int j = 0; j < k; j++) {
                double acc = 0;
                for (int a = 0; a < n; a++) {
                    double d = x[t * n + a] - mu[a];
                    acc += (corr ? (sigma[a] > 0 ? d / sigma[a] : 0) : d) * e[a * k + j];
                }
                fr[t * k + j] = acc;
            }
        }
        double sw2 = 0;
        for (double wt : w) sw2 += wt * wt;
        FactorModel model = new FactorModel(universe, k, exposures, f, spec);
        return new FitResult(model, window.dates(), lambda, share, mu, fr, excluded,
                new FactorCountReport(options.rule().name(), k, criterion),
                new ImputationReport(imputed, 0, 0, true),
                new AlignmentReport(previous == null, flipped, common, previous == null ? "first fit" : "signs agree with the previous fit"),
                1.0 / sw2, System.nanoTime() - start);
    }

    private static double[] weights(int rows, Double halfLife) {
        double[] w = new double[rows];
        double sum = 0;
        for (int t = 0; t < rows; t++) {
            w[t] = halfLife == null ? 1 : Math.pow(2, -(rows - 1 - t) / halfLife);
            sum += w[t];
        }
        for (int t = 0; t < rows; t++) w[t] /= sum;
        return w;
    }

    /** Bai-Ng IC_p2 per k = 0..max, or eigenvalue ratios per k = 1..max; empty for other rules. */
    private static double[] criterion(FactorRule rule, double[] lambda, double total, int n, int rows) {
        if (rule instanceof FactorRule.BaiNg bn) {
            int max = Math.min(bn.max(), lambda.length);
            double[] ic = new double[max + 1];
            double residual = total;
            double g = (double) (n + rows) / ((double) n * rows) * Math.log(Math.min(n, rows));
            for (int k = 0; k <= max; k++) {
                if (k > 0) residual -= lambda[k - 1];
                ic[k] = Math.log(Math.max(residual, Double.MIN_NORMAL)) + k * g;
            }
            return ic;
        }
        if (rule instanceof FactorRule.EigenvalueRatio er) {
            int max = Math.min(er.max(), lambda.length - 1);
            double[] ratio = new double[Math.max(max, 0)];
            for (int k = 1; k <= max; k++) ratio[k - 1] = lambda[k - 1] / lambda[k];
            return ratio;
        }
        return new double[0];
    }

    private static int chooseK(FactorRule rule, double[] lambda, double[] share, double[] criterion, int n, int rows, double total) {
        if (rule instanceof FactorRule.Fixed fx) return fx.count();
        if (rule instanceof FactorRule.VarianceShare vs) {
            double acc = 0;
            for (int j = 0; j < share.length; j++) {
                acc += share[j];
                if (acc >= vs.share() - 1e-12) return j + 1;
            }
            return share.length;
        }
        if (rule instanceof FactorRule.BaiNg) return argBest(criterion, false);
        if (rule instanceof FactorRule.EigenvalueRatio) return criterion.length == 0 ? 1 : argBest(criterion, true) + 1;
        double sigma2 = total / n;
        double edge = sigma2 * Math.pow(1 + Math.sqrt((double) n / rows), 2);
        int k = 0;
        while (k < lambda.length && lambda[k] > edge) k++;
        return k;
    }

    private static int argBest(double[] v, boolean max) {
        int best = 0;
        for (int j = 1; j < v.length; j++) if (max ? v[j] > v[best] : v[j] < v[best]) best = j;
        return best;
    }
}
