package eigencov.math;

import java.util.Arrays;
import java.util.Collections;
import java.util.HashMap;
import java.util.List;
import java.util.Map;

/**
 * The served factor model {@code C = B F B' + D} (docs/design.md section 3).
 *
 * @param tickers           K tickers in universe order
 * @param factors           k, at least 1
 * @param exposures         B, K x k row-major
 * @param factorCovariance  F, k x k row-major, symmetric (diagonal = eigenvalues unless rotated)
 * @param specificVariances D, K non-negative values
 * @param index             ticker -> position, derived from {@code tickers} (any value passed is replaced);
 *                          use the five-argument constructor
 * Arrays are copied in and out; hot paths use {@link #exposure}, {@link #specificVariance},
 * {@link #factorCov} which do not copy.
 */
public record FactorModel(List<String> tickers, int factors, double[] exposures, double[] factorCovariance,
                          double[] specificVariances, Map<String, Integer> index) {

    /** The model from its five defining parts; the index is derived. */
    public FactorModel(List<String> tickers, int factors, double[] exposures, double[] factorCovariance,
                       double[] specificVariances) {
        this(tickers, factors, exposures, factorCovariance, specificVariances, null);
    }

    public FactorModel {
        tickers = List.copyOf(tickers);
        int n = tickers.size();
        if (factors < 1) {
            throw new IllegalArgumentException("factors must be at least 1, was " + factors);
        }
        if (exposures.length != (long) n * factors) {
            throw new IllegalArgumentException("exposures length " + exposures.length + " != " + n + " x " + factors);
        }
        if (factorCovariance.length != factors * factors) {
            throw new IllegalArgumentException("factorCovariance length " + factorCovariance.length + " != "
                    + factors + " x " + factors);
        }
        if (specificVariances.length != n) {
            throw new IllegalArgumentException("specificVariances length " + specificVariances.length + " != " + n);
        }
        for (int p = 0; p < exposures.length; p++) {
            if (!Double.isFinite(exposures[p])) {
                throw new IllegalArgumentException("exposure of '" + tickers.get(p / factors) + "' factor "
                        + (p % factors) + " is not finite");
            }
        }
        for (int i = 0; i < factors; i++) {
            for (int j = 0; j < factors; j++) {
                double a = factorCovariance[i * factors + j];
                if (!Double.isFinite(a) || a != factorCovariance[j * factors + i]) {
                    throw new IllegalArgumentException("factorCovariance must be finite and symmetric at (" + i + ", "
                            + j + ")");
                }
            }
            if (factorCovariance[i * factors + i] < 0) {
                throw new IllegalArgumentException("factor variance " + i + " is negative");
            }
        }
        for (int i = 0; i < n; i++) {
            if (!(specificVariances[i] >= 0) || Double.isInfinite(specificVariances[i])) {
                throw new IllegalArgumentException("specific variance of '" + tickers.get(i)
                        + "' must be finite and non-negative, was " + specificVariances[i]);
            }
        }
        exposures = exposures.clone();
        factorCovariance = factorCovariance.clone();
        specificVariances = specificVariances.clone();
        Map<String, Integer> m = new HashMap<>(n * 2);
        for (int i = 0; i < n; i++) {
            if (m.put(tickers.get(i), i) != null) {
                throw new IllegalArgumentException("duplicate ticker '" + tickers.get(i) + "' at position " + i);
            }
        }
        index = Collections.unmodifiableMap(m);
    }

    /**
     * This model with more rows: {@code tickers} (none already here) with exposures (n x k row-major)
     * and specific variances, after the existing ones; same factor covariance.
     */
    public FactorModel withRows(List<String> more, double[] moreExposures, double[] moreSpecific) {
        int n = tickers.size();
        if (moreExposures.length != (long) more.size() * factors || moreSpecific.length != more.size()) {
            throw new IllegalArgumentException("rows to add do not match " + more.size() + " tickers x " + factors + " factors");
        }
        List<String> t = new java.util.ArrayList<>(n + more.size());
        t.addAll(tickers);
        t.addAll(more);
        double[] b = Arrays.copyOf(exposures, exposures.length + moreExposures.length);
        System.arraycopy(moreExposures, 0, b, exposures.length, moreExposures.length);
        double[] d = Arrays.copyOf(specificVariances, n + moreSpecific.length);
        System.arraycopy(moreSpecific, 0, d, n, moreSpecific.length);
        return new FactorModel(t, factors, b, factorCovariance, d);
    }

    /** The model variance {@code C_ii = (B F B')_ii + D_ii} of every row. O(K k^2). */
    public double[] diagonal() {
        int k = factors;
        double[] out = new double[tickers.size()];
        for (int i = 0; i < out.length; i++) {
            int o = i * k;
            double s = 0;
            for (int a = 0; a < k; a++) {
                double fb = 0;
                for (int b = 0; b < k; b++) {
                    fb += factorCovariance[a * k + b] * exposures[o + b];
                }
                s += exposures[o + a] * fb;
            }
            out[i] = s + specificVariances[i];
        }
        return out;
    }

    /** Number of tickers K. */
    public int size() {
        return tickers.size();
    }

    /** Position of {@code ticker} in {@link #tickers()}, or -1 when absent. O(1). */
    public int indexOf(String ticker) {
        Integer p = index.get(ticker);
        return p == null ? -1 : p;
    }

    /** B[i][j] without copying. */
    public double exposure(int i, int j) {
        return exposures[i * factors + j];
    }

    /** F[a][b] without copying. */
    public double factorCov(int a, int b) {
        return factorCovariance[a * factors + b];
    }

    /** D[i] without copying. */
    public double specificVariance(int i) {
        return specificVariances[i];
    }

    /** Whether F is diagonal (true unless a rotation was applied). */
    public boolean diagonalFactorCovariance() {
        for (int a = 0; a < factors; a++) {
            for (int b = 0; b < factors; b++) {
                if (a != b && factorCovariance[a * factors + b] != 0) {
                    return false;
                }
            }
        }
        return true;
    }

    @Override
    public double[] exposures() {
        return exposures.clone();
    }

    @Override
    public double[] factorCovariance() {
        return factorCovariance.clone();
    }

    @Override
    public double[] specificVariances() {
        return specificVariances.clone();
    }

    // package-private no-copy views for kernels in this package
    double[] exposuresView() {
        return exposures;
    }

    double[] factorCovarianceView() {
        return factorCovariance;
    }

    double[] specificView() {
        return specificVariances;
    }

    @Override
    public boolean equals(Object o) {
        return o instanceof FactorModel m && factors == m.factors && tickers.equals(m.tickers)
                && Arrays.equals(exposures, m.exposures) && Arrays.equals(factorCovariance, m.factorCovariance)
                && Arrays.equals(specificVariances, m.specificVariances);
    }

    @Override
    public int hashCode() {
        return 31 * (31 * tickers.hashCode() + factors) + Arrays.hashCode(exposures);
    }

    @Override
    public String toString() {
        return "FactorModel[K=" + tickers.size() + ", k=" + factors + "]";
    }
}
