package eigencov.math;

/**
 * A factor model's covariance {@code C = B F B' + D} on a subset of its names, as a forecast to
 * score: portfolio variances in O(n k + k^2) and the inverse by Woodbury's identity
 * ({@link FactorInverse}), never an n x n matrix.
 */
public final class FactorForecast implements CovarianceForecast {
    private final FactorModel model;
    private final int[] rows;
    private CovarianceInverse inverse;
    private boolean inverted;

    /**
     * @param model the fitted model
     * @param rows  positions in {@link FactorModel#tickers()} of the forecast's names, in forecast order
     */
    public FactorForecast(FactorModel model, int[] rows) {
        for (int a = 0; a < rows.length; a++) {
            if (rows[a] < 0 || rows[a] >= model.size()) {
                throw new IllegalArgumentException("rows[" + a + "] = " + rows[a] + " is not a row of the model (size " + model.size() + ")");
            }
        }
        this.model = model;
        this.rows = rows.clone();
    }

    @Override
    public int size() {
        return rows.length;
    }

    @Override
    public double variance(double[] w) {
        if (w.length != rows.length) throw new IllegalArgumentException("w has length " + w.length + ", expected " + rows.length);
        return quadratic(rows, w);
    }

    @Override
    public double variance(int[] idx, double[] w) {
        int[] r = new int[idx.length];
        for (int a = 0; a < idx.length; a++) r[a] = rows[idx[a]];
        return quadratic(r, w);
    }

    @Override
    public double variance(int i) {
        int k = model.factors();
        int row = rows[i];
        double s = 0;
        for (int p = 0; p < k; p++) {
            double fb = 0;
            for (int q = 0; q < k; q++) fb += model.factorCov(p, q) * model.exposure(row, q);
            s += model.exposure(row, p) * fb;
        }
        return s + model.specificVariance(row);
    }

    /** (B'w)' F (B'w) + sum d w^2 over the model rows {@code r}. */
    private double quadratic(int[] r, double[] w) {
        int k = model.factors();
        double[] x = new double[k];
        double spec = 0;
        for (int a = 0; a < r.length; a++) {
            double wa = w[a];
            if (wa == 0) continue;
            for (int p = 0; p < k; p++) x[p] += model.exposure(r[a], p) * wa;
            spec += model.specificVariance(r[a]) * wa * wa;
        }
        double s = 0;
        for (int p = 0; p < k; p++) {
            double fx = 0;
            for (int q = 0; q < k; q++) fx += model.factorCov(p, q) * x[q];
            s += x[p] * fx;
        }
        return Math.max(0, s) + spec;
    }

    @Override
    public synchronized CovarianceInverse inverse() {
        if (!inverted) {
            inverted = true;
            try {
                inverse = FactorInverse.of(model, rows);
            } catch (SingularCovarianceException e) {
                inverse = null;
            }
        }
        return inverse;
    }
}
