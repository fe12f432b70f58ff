package eigencov.math;

import java.time.LocalDate;
import java.util.ArrayList;
import java.util.List;
import java.util.Objects;
import java.util.concurrent.ExecutorService;

/**
 * Fits a statistical factor model to one window (design.md section 3): coverage filter,
 * weights, EM-PCA imputation of gaps, exact principal components (Gram route when K > T),
 * factor-count rule, specific variances with floor, factor returns, sign alignment.
 * Stateless apart from the executor; safe to share between threads.
 */
public final class FactorFitter {

    /** EM stopping tolerance on the relative change of imputed cells (methods.md section 7: 1e-6, practice). */
    public static final double DEFAULT_EM_TOLERANCE = 1e-6;
    /** EM iteration cap (methods.md section 7: 100-500, practice). */
    public static final int DEFAULT_EM_MAX_ITERATIONS = 200;
    /** Power steps in the first EM iteration, from a start that knows nothing about the standardised data. */
    private static final int EM_FIRST_POWER_STEPS = 3;
    /** Tickers per block when gathering the row-major window into ticker-major rows (cache lines reused). */
    private static final int GATHER_BLOCK = 32;

    private final Parallel par;
    private final double emTolerance;
    private final int emMaxIterations;

    /** @param poolOrNull executor for the parallel kernels; null runs everything on the calling thread */
    public FactorFitter(ExecutorService poolOrNull) {
        this(poolOrNull, DEFAULT_EM_TOLERANCE, DEFAULT_EM_MAX_ITERATIONS);
    }

    public FactorFitter(ExecutorService poolOrNull, double emTolerance, int emMaxIterations) {
        if (!(emTolerance > 0) || emMaxIterations < 1) {
            throw new IllegalArgumentException("emTolerance must be positive and emMaxIterations at least 1, were "
                    + emTolerance + ", " + emMaxIterations);
        }
        this.par = new Parallel(poolOrNull);
        this.emTolerance = emTolerance;
        this.emMaxIterations = emMaxIterations;
    }

    /**
     * Fits the model.
     *
     * @param window   the T x K window (already selected by the caller, point-in-time)
     * @param options  rule, weights, coverage, basis, floor
     * @param previous the currently served model of the same spec, or null on a first fit
     * @throws InsufficientDataException when T < 2, no ticker passes the coverage filter, or the window
     *                                   has no variance
     */
    public FitResult fit(ReturnPanel window, FitOptions options, FactorModel previous) {
        long start = System.nanoTime();
        Objects.requireNonNull(window, "window");
        Objects.requireNonNull(options, "options");
        int dates = window.rows();
        int cols = window.cols();
        if (dates < 2) {
            throw new InsufficientDataException("the window has " + dates + " date(s); a fit needs at least 2");
        }
        if (cols == 0) {
            throw new InsufficientDataException("the window has no tickers");
        }
        double[] values = window.valuesView();
        // coverage
        int required = requiredObservations(options.minCoverage(), dates);
        int[] counts = new int[cols];
        for (int t = 0; t < dates; t++) {
            int o = t * cols;
            for (int i = 0; i < cols; i++) {
                if (!Double.isNaN(values[o + i])) {
                    counts[i]++;
                }
            }
        }
        List<Exclusion> excluded = new ArrayList<>();
        int[] admitted = new int[cols];
        int k0 = 0;
        for (int i = 0; i < cols; i++) {
            if (counts[i] >= required) {
                admitted[k0++] = i;
            } else {
                excluded.add(new Exclusion(window.tickers().get(i), counts[i], required, Exclusion.COVERAGE));
            }
        }
        double[] w = weights(dates, options.halfLifeDays());
        double tEff = effectiveObservations(w);
        double[] sqrtW = new double[dates];
        for (int t = 0; t < dates; t++) {
            sqrtW[t] = Math.sqrt(w[t]);
        }
        // ticker-major raw values (blocked transpose of the admitted columns), gaps filled by the weighted
        // mean of the observed cells
        double[] x = new double[k0 * dates];
        for (int a0 = 0; a0 < k0; a0 += GATHER_BLOCK) {
            int a1 = Math.min(k0, a0 + GATHER_BLOCK);
            for (int t = 0; t < dates; t++) {
                int row = t * cols;
                for (int a = a0; a < a1; a++) {
                    x[a * dates + t] = values[row + admitted[a]];
                }
            }
        }
        int missing = 0;
        for (int a = 0; a < k0; a++) {
            int xo = a * dates;
            if (counts[admitted[a]] == dates) {
                continue;
            }
            double sw = 0;
            double sx = 0;
            for (int t = 0; t < dates; t++) {
                double v = x[xo + t];
                if (!Double.isNaN(v)) {
                    sw += w[t];
                    sx += w[t] * v;
                }
            }
            double mean = sx / sw;
            for (int t = 0; t < dates; t++) {
                if (Double.isNaN(x[xo + t])) {
                    x[xo + t] = mean;
                    missing++;
                }
            }
        }
        int[] gaps = new int[missing];
        int g = 0;
        for (int p = 0; p < x.length && g < missing; p++) {
            int a = p / dates;
            int t = p % dates;
            if (Double.isNaN(values[t * cols + admitted[a]])) {
                gaps[g++] = p;
            }
        }
        List<String> universe = new ArrayList<>(k0);
        for (int a = 0; a < k0; a++) {
            universe.add(window.tickers().get(admitted[a]));
        }
        if (options.basis() == Basis.CORRELATION) {
            // a constant series has no correlation: leave it out, with the reason
            int kept = 0;
            int[] remap = new int[k0];
            List<String> keptNames = new ArrayList<>();
            for (int a = 0; a < k0; a++) {
                if (weightedVariance(x, a, dates, w) > 0) {
                    remap[a] = kept;
                    if (kept != a) {
                        System.arraycopy(x, a * dates, x, kept * dates, dates);
                    }
                    keptNames.add(universe.get(a));
                    kept++;
                } else {
                    remap[a] = -1;
                    excluded.add(new Exclusion(universe.get(a), counts[admitted[a]], required,
                            Exclusion.ZERO_VARIANCE));
                }
            }
            if (kept < k0) {
                int ng = 0;
                for (int gi = 0; gi < gaps.length; gi++) {
                    int a = gaps[gi] / dates;
                    if (remap[a] >= 0) {
                        gaps[ng++] = remap[a] * dates + gaps[gi] % dates;
                    }
                }
                gaps = java.util.Arrays.copyOf(gaps, ng);
                universe = keptNames;
                k0 = kept;
                x = java.util.Arrays.copyOf(x, kept * dates);
            }
        }
        if (k0 == 0) {
            throw new InsufficientDataException("no ticker has at least " + required + " of " + dates
                    + " observations (minCoverage " + options.minCoverage() + ")"
                    + (options.basis() == Basis.CORRELATION ? " and non-zero variance" : ""));
        }
        int assets = k0;
        ImputationReport imputation = gaps.length == 0
                ? ImputationReport.none(emTolerance, emMaxIterations)
                : impute(x, assets, dates, gaps, w, sqrtW, tEff, options);

        // final decomposition on the completed window
        double[] mean = new double[assets];
        double[] variance = new double[assets];
        // the completed raw values are not needed again: standardise in place (saves a K x T array)
        double[] m = x;
        double[] scale = standardise(x, assets, dates, w, sqrtW, mean, variance, options.basis() == Basis.CORRELATION,
                m);
        double trace = 0;
        for (int p = 0; p < m.length; p++) {
            trace += m[p] * m[p];
        }
        PcaSolver pca = PcaSolver.exact(m, assets, dates, par);
        if (pca.rank() == 0) {
            throw new InsufficientDataException("every return series in the window is constant: no variance to fit");
        }
        double[] eigenvalues = pca.eigenvalues();
        FactorCountReport count = FactorCount.choose(options.rule(), eigenvalues, assets, tEff, trace);
        int k = count.k();
        double[] v = pca.vectors(k);
        AlignmentReport alignment = SignAlignment.align(v, k, universe, scale, previous);

        // model
        double[] b = new double[assets * k];
        double[] specific = new double[assets];
        for (int i = 0; i < assets; i++) {
            double sc = scale == null ? 1 : scale[i];
            double common = 0;
            for (int c = 0; c < k; c++) {
                double e = v[c * assets + i];
                b[i * k + c] = e * sc;
                common += e * e * eigenvalues[c];
            }
            common *= sc * sc;
            double d = variance[i] - common;
            specific[i] = Math.max(d, options.specificFloor() * variance[i]);
        }
        double[] f = new double[k * k];
        for (int c = 0; c < k; c++) {
            f[c * k + c] = eigenvalues[c];
        }
        FactorModel model = new FactorModel(universe, k, b, f, specific);

        // factor returns f_t = (x_t - mu)' E (standardised for correlation): rows of E M, unweighted
        double[] fr = new double[k * dates];
        Dense.leftMultiply(v, k, m, assets, dates, fr, par);
        double[] factorReturns = new double[dates * k];
        for (int c = 0; c < k; c++) {
            for (int t = 0; t < dates; t++) {
                factorReturns[t * k + c] = fr[c * dates + t] / sqrtW[t];
            }
        }
        double[] share = new double[eigenvalues.length];
        for (int j = 0; j < share.length; j++) {
            share[j] = eigenvalues[j] / trace;
        }
        List<LocalDate> used = window.dates();
        return new FitResult(model, used, eigenvalues, share, mean, factorReturns, excluded, count, imputation,
                alignment, tEff, System.nanoTime() - start, pca.rank(), trace, options.basis());
    }

    /** Observations a ticker needs: ceil(minCoverage * T), at least 1 (the 1e-9 absorbs rounding of minCoverage * T). */
    public static int requiredObservations(double minCoverage, int dates) {
        return Math.max(1, (int) Math.ceil(minCoverage * dates - 1e-9));
    }

    /**
     * Window weights summing to 1: equal, or w_t proportional to 2^(-(T-1-t)/h) for half-life h in
     * window positions (design.md section 3).
     */
    public static double[] weights(int dates, Double halfLifeDays) {
        double[] w = new double[dates];
        double sum = 0;
        for (int t = 0; t < dates; t++) {
            w[t] = halfLifeDays == null ? 1.0 : Math.pow(2.0, -(dates - 1 - t) / halfLifeDays);
            sum += w[t];
        }
        for (int t = 0; t < dates; t++) {
            w[t] /= sum;
        }
        return w;
    }

    /** T_eff = (sum w)^2 / sum w^2 (methods.md section 6). */
    public static double effectiveObservations(double[] w) {
        double s = 0;
        double s2 = 0;
        for (double v : w) {
            s += v;
            s2 += v * v;
        }
        return s * s / s2;
    }

    /**
     * Weighted variance of series a, or 0 when every deviation from the mean is within rounding
     * (1e-13 of the largest |value|): a constant series whose weighted mean differs by an ulp.
     */
    private static double weightedVariance(double[] x, int a, int dates, double[] w) {
        int o = a * dates;
        double mu = 0;
        double big = 0;
        for (int t = 0; t < dates; t++) {
            mu += w[t] * x[o + t];
            big = Math.max(big, Math.abs(x[o + t]));
        }
        double v = 0;
        double worst = 0;
        for (int t = 0; t < dates; t++) {
            double d = x[o + t] - mu;
            v += w[t] * d * d;
            worst = Math.max(worst, Math.abs(d));
        }
        return worst <= 1e-13 * big ? 0 : v;
    }

    /**
     * Fills m (K x T; may be x itself) with sqrt(w_t) (x_ti - mu_i), divided by sigma_i when {@code standardised};
     * writes weighted means and variances S_ii. Returns the per-ticker sigma (exposure scale) for
     * the standardised case, else null. A zero sigma is treated as 1.
     */
    private static double[] standardise(double[] x, int assets, int dates, double[] w, double[] sqrtW,
                                        double[] mean, double[] variance, boolean standardised, double[] m) {
        double[] sigma = standardised ? new double[assets] : null;
        for (int i = 0; i < assets; i++) {
            int o = i * dates;
            double mu = 0;
            for (int t = 0; t < dates; t++) {
                mu += w[t] * x[o + t];
            }
            double s = 0;
            for (int t = 0; t < dates; t++) {
                double d = sqrtW[t] * (x[o + t] - mu);
                m[o + t] = d;
                s += d * d;
            }
            mean[i] = mu;
            variance[i] = s;
            if (standardised) {
                double sd = s > 0 ? Math.sqrt(s) : 1;
                sigma[i] = sd;
                double inv = 1.0 / sd;
                for (int t = 0; t < dates; t++) {
                    m[o + t] *= inv;
                }
            }
        }
        return sigma;
    }

    /**
     * EM-PCA imputation (methods.md section 7) in place on x (K x T, gaps pre-filled with the weighted
     * observed mean). The number of factors comes from the fit's own rule on the mean-filled window;
     * then repeat: standardise with the current weighted means and deviations, update the k-dimensional
     * subspace by a subspace-iteration step warm-started from the last one, replace the gaps by their
     * rank-k reconstruction; stop when RMS(change over gaps) / RMS(demeaned observed values) is at most
     * the tolerance.
     */
    private ImputationReport impute(double[] x, int assets, int dates, int[] gaps, double[] w, double[] sqrtW,
                                    double tEff, FitOptions options) {
        double[] mean = new double[assets];
        double[] variance = new double[assets];
        double[] m = new double[assets * dates];
        double[] sd = standardise(x, assets, dates, w, sqrtW, mean, variance, true, m);
        PcaSolver first = PcaSolver.exact(m, assets, dates, par);
        if (first.rank() == 0) {
            return new ImputationReport(gaps.length, 0, 0, true, 0, emTolerance, emMaxIterations);
        }
        double trace = 0;
        for (double v : m) {
            trace += v * v;
        }
        int k = FactorCount.choose(options.rule(), first.eigenvalues(), assets, tEff, trace).k();
        double[] q = first.vectors(k);
        // scale of the data the change is measured against: observed cells, demeaned
        boolean[] isGap = new boolean[x.length];
        for (int p : gaps) {
            isGap[p] = true;
        }
        double obs = 0;
        long nObs = 0;
        for (int i = 0; i < assets; i++) {
            for (int t = 0; t < dates; t++) {
                int p = i * dates + t;
                if (!isGap[p]) {
                    double d = x[p] - mean[i];
                    obs += d * d;
                    nObs++;
                }
            }
        }
        double rmsObs = Math.sqrt(obs / Math.max(1, nObs));
        double[] y = new double[k * dates];
        double change = Double.POSITIVE_INFINITY;
        int iterations = 0;
        boolean converged = false;
        while (iterations < emMaxIterations) {
            iterations++;
            if (iterations > 1) {
                sd = standardise(x, assets, dates, w, sqrtW, mean, variance, true, m);
            }
            int steps = iterations == 1 ? EM_FIRST_POWER_STEPS : 1;
            int kq = k;
            for (int s = 0; s < steps; s++) {
                Dense.leftMultiply(q, kq, m, assets, dates, y, par);
                Dense.rowDots(y, kq, dates, m, assets, q, par);
                kq = Dense.orthonormalizeRows(q, kq, assets);
            }
            Dense.leftMultiply(q, k, m, assets, dates, y, par);
            double ss = 0;
            for (int p : gaps) {
                int i = p / dates;
                int t = p % dates;
                double z = 0;
                for (int c = 0; c < k; c++) {
                    z += q[c * assets + i] * y[c * dates + t];
                }
                double next = mean[i] + sd[i] * z / sqrtW[t];
                double d = next - x[p];
                ss += d * d;
                x[p] = next;
            }
            change = rmsObs > 0 ? Math.sqrt(ss / gaps.length) / rmsObs : 0;
            if (change <= emTolerance) {
                converged = true;
                break;
            }
        }
        return new ImputationReport(gaps.length, iterations, change, converged, k, emTolerance, emMaxIterations);
    }
}
