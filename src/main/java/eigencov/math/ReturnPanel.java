package eigencov.math;

import java.time.LocalDate;
import java.util.HashSet;
import java.util.List;

/**
 * A T x K window of simple returns: rows are dates (ascending, distinct), columns are tickers
 * (distinct), values row-major {@code values[t*K + i]}. {@code Double.NaN} marks a missing
 * observation; infinite values are rejected. The array is copied on the way in and out.
 */
public record ReturnPanel(List<LocalDate> dates, List<String> tickers, double[] values) {

    public ReturnPanel {
        dates = List.copyOf(dates);
        tickers = List.copyOf(tickers);
        if (values == null) {
            throw new IllegalArgumentException("values must not be null");
        }
        long expected = (long) dates.size() * tickers.size();
        if (values.length != expected) {
            throw new IllegalArgumentException("values length " + values.length + " != dates " + dates.size()
                    + " x tickers " + tickers.size());
        }
        for (int t = 1; t < dates.size(); t++) {
            if (!dates.get(t - 1).isBefore(dates.get(t))) {
                throw new IllegalArgumentException("dates must be ascending and distinct: row " + t + " ("
                        + dates.get(t) + ") is not after " + dates.get(t - 1));
            }
        }
        HashSet<String> seen = new HashSet<>();
        for (int i = 0; i < tickers.size(); i++) {
            if (!seen.add(tickers.get(i))) {
                throw new IllegalArgumentException("duplicate ticker '" + tickers.get(i) + "' at column " + i);
            }
        }
        values = values.clone();
        int cols = tickers.size();
        for (int p = 0; p < values.length; p++) {
            if (Double.isInfinite(values[p])) {
                throw new IllegalArgumentException("infinite return at row " + (p / cols) + " (" + dates.get(p / cols)
                        + "), ticker '" + tickers.get(p % cols) + "'");
            }
        }
    }

    /** Number of dates T. */
    public int rows() {
        return dates.size();
    }

    /** Number of tickers K. */
    public int cols() {
        return tickers.size();
    }

    /** A copy of the row-major values. */
    @Override
    public double[] values() {
        return values.clone();
    }

    /** The values without copying, for kernels in this package. */
    double[] valuesView() {
        return values;
    }

    /** Value at date row {@code t} and ticker column {@code i} (NaN when missing); no copy. */
    public double value(int t, int i) {
        return values[t * tickers.size() + i];
    }

    /** Whether the cell at (t, i) is observed. */
    public boolean observed(int t, int i) {
        return !Double.isNaN(values[t * tickers.size() + i]);
    }
}
