package eigencov.math;

import java.util.List;

/**
 * Names a fit serves beside its universe although their history in the window is below the
 * coverage threshold (docs/design.md section 6, "Short-history names"; docs/methods.md section 7,
 * project-in). Their exposures and specific variances come from {@link ShortHistoryFit}, after the
 * main fit and from its factor returns; they never enter the principal components. Arrays are
 * copied in and out.
 *
 * @param tickers           the names, in window order
 * @param observations      observed dates of each name in the window
 * @param factors           k of the fit (any value when there are no names)
 * @param exposures         n x k row-major
 * @param specificVariances n values, floored
 */
public record ShortHistory(List<String> tickers, int[] observations, int factors, double[] exposures,
                           double[] specificVariances) {

    /** No short-history names (the option is off, or no name qualified). */
    public static final ShortHistory NONE = new ShortHistory(List.of(), new int[0], 0, new double[0], new double[0]);

    public ShortHistory {
        tickers = List.copyOf(tickers);
        int n = tickers.size();
        if (factors < 0 || (n > 0 && factors < 1)) {
            throw new IllegalArgumentException("factors must be at least 1 when there are names, was " + factors);
        }
        if (observations.length != n || specificVariances.length != n || exposures.length != (long) n * factors) {
            throw new IllegalArgumentException("short-history arrays do not match " + n + " names x " + factors + " factors");
        }
        for (int i = 0; i < n; i++) {
            if (!(specificVariances[i] >= 0) || Double.isInfinite(specificVariances[i])) {
                throw new IllegalArgumentException("specific variance of '" + tickers.get(i) + "' must be finite and non-negative");
            }
        }
        observations = observations.clone();
        exposures = exposures.clone();
        specificVariances = specificVariances.clone();
    }

    /** Number of names. */
    public int size() {
        return tickers.size();
    }

    @Override
    public int[] observations() {
        return observations.clone();
    }

    @Override
    public double[] exposures() {
        return exposures.clone();
    }

    @Override
    public double[] specificVariances() {
        return specificVariances.clone();
    }
}
