package eigencov.math;

import java.time.LocalDate;
import java.util.List;

/**
 * A T x K window of simple returns: rows are dates (ascending, distinct), columns are tickers,
 * values row-major {@code values[t*K + i]}; {@code Double.NaN} marks a missing observation.
 * The array is copied on the way in and out.
 */
public record ReturnPanel(List<LocalDate> dates, List<String> tickers, double[] values) {

    public ReturnPanel {
        dates = List.copyOf(dates);
        tickers = List.copyOf(tickers);
        if (values == null) throw new IllegalArgumentException("values must not be null");
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
        values = values.clone();
    }

    /** A copy of the row-major values. */
    @Override
    public double[] values() {
        return values.clone();
    }

    /** Value at date row {@code t} and ticker column {@code i} (NaN when missing); no copy. */
    public double value(int t, int i) {
        return values[t * tickers.size() + i];
    }
}
