package eigencov.math;

import java.time.LocalDate;
import java.util.ArrayList;
import java.util.List;
import java.util.Objects;
import java.util.concurrent.ExecutorService;

/**
 * Fits a statistical factor model to one window (docs/design.md section 3): coverage filter,
 * weights, EM-PCA imputation of gaps, exact principal components (Gram route when K > T),
 * factor-count rule, specific variances with floor, factor returns, sign alignment; then, when
 * the options ask for them, short-history names ({@link ShortHistoryFit}, a separate step on the
 * finished fit). Stateless apart from the executor; safe to share between threads.
 */
public final class FactorFitter {

    /**
     * EM stopping tolerance (docs/methods.md section 7: 1e-6 relative, practice), on the relative change of the imputed
     * cells or of the observed-cell objective, whichever gets there first.
     */
    public static final double DEFAULT_EM_TOLERANCE = 1e-6;
    /** EM iteration cap (docs/methods.md section 7: 100-500, practice). */
    public static final int DEFAULT_EM_MAX_ITERATIONS = 200;
    /**
     * Dimensions EM tracks beyond the k it imputes with, so that the top-k subspace converges even when
     * lambda_k has no gap below it. Halko, Martinsson and Tropp (2011, SIAM Review 53(2), section 4.2) find
     * an oversampling of 5 or 10 adequate for randomized range finders (from memory); on the demo's
     * 15-factor window of 2026-11-27, EM to 1e-6 on the imputed cells took 396 iterations with none,
     * 38 with 5, 26 with 10, 18 with 20 and 15 with 30: 10 needs the least work.
     */
    private static final int EM_OVERSAMPLE = 10;
    /**
     * The observed-cell objective is used for stopping only above this share of ||M||^2: below it the
     * observed cells are fitted to rounding level (an exactly low-rank window), the objective's rounding
     * error (about eps ||M||^2) dominates its changes, and the imputed values decide alone.
     */
    private static final double EM_OBJECTIVE_FLOOR = 1e-8;
    /** Tickers per block when gathering the row-major window into ticker-major rows (cache lines reused). */
    private static final int GATHER_BLOCK = 32;

    private final Parallel par;
    /** For the small Rayleigh-Ritz products inside EM, where splitting costs more than it saves. */
    private final Parallel serial = new Parallel(null);
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
        // one pass over the window: ticker-major copy of every column (blocked transpose, cache lines
        // reused) and the observation count per ticker for the coverage filter
        int required = requiredObservations(options.minCoverage(), dates);
        int[] counts = new int[cols];
        double[] x = new double[cols * dates];
        for (int a0 = 0; a0 < cols; a0 += GATHER_BLOCK) {
            int a1 = Math.min(cols, a0 + GATHER_BLOCK);
            for (int t = 0; t < dates; t++) {
                int row = t * cols;
                for (int a = a0; a < a1; a++) {
                    double v = values[row + a];
                    x[a * dates + t] = v;
                    if (v == v) {
                        counts[a]++;
                    }
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
        // keep the admitted rows (in place: admitted[a] >= a), gaps filled by the weighted mean of the
        // observed cells and recorded in ascending position
        if (k0 < cols) {
            for (int a = 0; a < k0; a++) {
                if (admitted[a] != a) {
                    System.arraycopy(x, admitted[a] * dates, x, a * dates, dates);
                }
            }
            x = java.util.Arrays.copyOf(x, k0 * dates);
        }
        int missing = 0;
        for (int a = 0; a < k0; a++) {
            missing += dates - counts[admitted[a]];
        }
        int[] gaps = new int[missing];
        int g = 0;
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
                    gaps[g++] = xo + t;
                }
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
        double trace = Dense.dot(m, 0, m, 0, m.length);
        PcaSolver pca = PcaSolver.exact(m, assets, dates, par);
        if (pca.rank() == 0) {
            throw new InsufficientDataException("every return series in the window is constant: no variance to fit");
        }
        double[] eigenvalues = pca.eigenvalues();
        FactorCountReport count = options.hold().apply(FactorCount.choose(options.rule(), eigenvalues, assets, tEff, trace),
                options.rule(), eigenvalues.length);
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
        // factor returns f_t = (x_t - mu)' E (standardised for correlation): rows of E M, unweighted
        double[] fr = new double[k * dates];
        Dense.leftMultiply(v, k, m, assets, dates, fr, par);
        double[] factorReturns = new double[dates * k];
        for (int c = 0; c < k; c++) {
            for (int t = 0; t < dates; t++) {
                factorReturns[t * k + c] = fr[c * dates + t] / sqrtW[t];
            }
        }
        if (options.rotate()) {
            alignment = alignment.withRotation(ProcrustesAlignment.align(b, f, factorReturns, k, universe, previous, alignment,
                    par));
        }
        FactorModel model = new FactorModel(universe, k, b, f, specific);
        double[] share = new double[eigenvalues.length];
        for (int j = 0; j < share.length; j++) {
            share[j] = eigenvalues[j] / trace;
        }
        List<LocalDate> used = window.dates();
        FitResult main = new FitResult(model, used, eigenvalues, share, mean, factorReturns, excluded, count, imputation,
                alignment, tEff, System.nanoTime() - start, pca.rank(), trace, options.basis(), variance, ShortHistory.NONE);
        return ShortHistoryFit.extend(main, window, options);
    }

    /** Observations a ticker needs: ceil(minCoverage * T), at least 1 (the 1e-9 absorbs rounding of minCoverage * T). */
    public static int requiredObservations(double minCoverage, int dates) {
        return Math.max(1, (int) Math.ceil(minCoverage * dates - 1e-9));
    }

    /**
     * Window weights summing to 1: equal, or w_t proportional to 2^(-(T-1-t)/h) for half-life h in
     * window positions (docs/design.md section 3).
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

    /** T_eff = (sum w)^2 / sum w^2 (docs/methods.md section 6). */
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
            double mu = Dense.dot(w, 0, x, o, dates);
            Dense.centreScale(x, o, mu, sqrtW, m, dates);
            double s = Dense.dot(m, o, m, o, dates);
            mean[i] = mu;
            variance[i] = s;
            if (standardised) {
                double sd = s > 0 ? Math.sqrt(s) : 1;
                sigma[i] = sd;
                Dense.scale(m, o, 1.0 / sd, dates);
            }
        }
        return sigma;
    }

    /**
     * EM-PCA imputation (docs/methods.md section 7) in place on x (K x T, gaps pre-filled with the weighted
     * observed mean). The number of factors k comes from the fit's own rule on the mean-filled window.
     * Each iteration: standardise with the current weighted means and deviations; take the top k Ritz
     * vectors of M M' in a tracked subspace of k + {@value #EM_OVERSAMPLE} dimensions (Rayleigh-Ritz);
     * replace the gaps by their rank-k reconstruction; stop when RMS(change over gaps) / RMS(demeaned
     * observed values) or the relative change of the observed-cell objective is at most the tolerance;
     * else advance the subspace by one subspace-iteration step Q = orth((Q M) M'), warm-started.
     *
     * <p>Why the oversampling: a k-dimensional tracker converges like (lambda_k+1 / lambda_k)^j, and a
     * fixed k larger than the factors the market carries (the demo's 15 on 13 planted) puts lambda_k
     * inside the noise spectrum, where that ratio is close to 1: EM ran into its cap after seconds with
     * the gaps still drifting. With the extra dimensions the top-k subspace converges like
     * (lambda_k+p+1 / lambda_k)^j, and EM at close to its own rate.
     *
     * <p>Why the objective: where a name has many gaps in the heavily weighted recent dates and k has
     * surplus factors, EM keeps moving its gap values along a weakly identified direction for hundreds of
     * iterations (even with an exact decomposition per step) while the fit to the observed cells has
     * settled; docs/methods.md section 7 stops on the objective. On the demo this ends the 2-year model's EM
     * after 8 to 71 iterations with the model covariance within 2e-4 (relative Frobenius) of a run to
     * 1e-8 on the imputed cells.
     */
    private ImputationReport impute(double[] x, int assets, int dates, int[] gaps, double[] w, double[] sqrtW,
                                    double tEff, FitOptions options) {
        double[] mean = new double[assets];
        double[] variance = new double[assets];
        double[] m = new double[assets * dates];
        double[] sd = standardise(x, assets, dates, w, sqrtW, mean, variance, true, m);
        PcaSolver first = PcaSolver.exact(m, assets, dates, par);
        if (first.rank() == 0) {
            return new ImputationReport(gaps.length, 0, 0, null, true, 0, emTolerance, emMaxIterations);
        }
        double trace = Dense.dot(m, 0, m, 0, m.length);
        int k = FactorCount.choose(options.rule(), first.eigenvalues(), assets, tEff, trace).k();
        // the tracked subspace starts at the exact leading eigenvectors of the mean-filled window
        int lq = Math.min(k + EM_OVERSAMPLE, first.rank());
        double[] q = first.vectors(lq);
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
        double[] y = new double[lq * dates];
        double[] h = new double[lq * lq];
        double[] qk = new double[k * assets];
        double[] yk = new double[k * dates];
        double change = Double.POSITIVE_INFINITY;
        double objectiveChange = Double.POSITIVE_INFINITY;
        double lastObjective = Double.NaN;
        int iterations = 0;
        boolean converged = false;
        while (iterations < emMaxIterations && lq > 0) {
            iterations++;
            if (iterations > 1) {
                sd = standardise(x, assets, dates, w, sqrtW, mean, variance, true, m);
            }
            // ||M||^2: every standardised series has unit weighted sum of squares, a constant one none
            int standardisedSeries = 0;
            for (int i = 0; i < assets; i++) {
                if (variance[i] > 0) {
                    standardisedSeries++;
                }
            }
            // Rayleigh-Ritz in span(Q): H = (Q M)(Q M)', its top eigenvectors Z give Ritz vectors Z Q, scores Z Q M
            Dense.leftMultiply(q, lq, m, assets, dates, y, par);
            Dense.rowDots(y, lq, dates, y, lq, h, serial);
            SymmetricEigen small = SymmetricEigen.decompose(h, lq);
            int kk = Math.min(k, lq);
            double[] z = small.leadingVectors(kk);
            Dense.leftMultiply(z, kk, q, lq, assets, qk, serial);
            Dense.leftMultiply(z, kk, y, lq, dates, yk, serial);
            double ss = 0;
            double gapResidual = 0;
            for (int p : gaps) {
                int i = p / dates;
                int t = p % dates;
                double r = 0;
                for (int c = 0; c < kk; c++) {
                    r += qk[c * assets + i] * yk[c * dates + t];
                }
                double next = mean[i] + sd[i] * r / sqrtW[t];
                double d = next - x[p];
                ss += d * d;
                x[p] = next;
                gapResidual += (m[p] - r) * (m[p] - r);
                m[p] = r; // the standardised cell sqrt(w_t) (next - mu_i) / sigma_i, for the step below
            }
            change = rmsObs > 0 ? Math.sqrt(ss / gaps.length) / rmsObs : 0;
            // observed-cell objective sum_obs (m - r)^2 = ||M||^2 - ||Ritz scores||^2 - gap residual (the Ritz
            // vectors are orthonormal, so the projection's residual is the norm lost), in the current standardisation
            double ritz = 0;
            for (int c = 0; c < kk; c++) {
                ritz += small.eigenvalue(c);
            }
            double objective = standardisedSeries - ritz - gapResidual;
            objectiveChange = objective > EM_OBJECTIVE_FLOOR * standardisedSeries && lastObjective > 0
                    ? Math.abs(objective - lastObjective) / objective : Double.POSITIVE_INFINITY;
            lastObjective = objective;
            if (change <= emTolerance || objectiveChange <= emTolerance) {
                converged = true;
                break;
            }
            // one subspace-iteration step on the updated window: Q = orth((Q M) M')
            Dense.rowDots(y, lq, dates, m, assets, q, par);
            lq = Dense.orthonormalizeRows(q, lq, assets);
        }
        return new ImputationReport(gaps.length, iterations, change,
                Double.isFinite(objectiveChange) ? objectiveChange : null, converged, k, emTolerance, emMaxIterations);
    }
}
