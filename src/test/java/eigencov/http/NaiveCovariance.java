package eigencov.http;

import eigencov.math.FactorModel;

import java.util.List;

/**
 * Test oracle: the covariance C = B F B' + D of named tickers by the definition (docs/design.md
 * section 3), element by element with plain loops, independent of the serving code.
 */
final class NaiveCovariance {
    private NaiveCovariance() {
    }

    static double[][] of(FactorModel m, List<String> tickers, double scale) {
        int n = tickers.size();
        int k = m.factors();
        double[][] c = new double[n][n];
        for (int r = 0; r < n; r++) {
            int i = m.indexOf(tickers.get(r));
            for (int s = 0; s < n; s++) {
                int j = m.indexOf(tickers.get(s));
                double v = 0;
                for (int a = 0; a < k; a++) {
                    for (int b = 0; b < k; b++) v += m.exposure(i, a) * m.factorCov(a, b) * m.exposure(j, b);
                }
                if (i == j) v += m.specificVariance(i);
                c[r][s] = v * scale;
            }
        }
        return c;
    }

    static double[][] correlation(FactorModel m, List<String> tickers) {
        double[][] c = of(m, tickers, 1);
        int n = c.length;
        double[][] r = new double[n][n];
        for (int a = 0; a < n; a++) {
            for (int b = 0; b < n; b++) r[a][b] = c[a][b] / Math.sqrt(c[a][a] * c[b][b]);
        }
        return r;
    }

    static double maxAbs(double[][] c) {
        double m = 0;
        for (double[] row : c) for (double v : row) m = Math.max(m, Math.abs(v));
        return m;
    }
}
