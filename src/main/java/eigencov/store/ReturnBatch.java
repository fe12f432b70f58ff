package eigencov.store;

import java.time.LocalDate;
import java.util.List;

/**
 * A validated batch of returns ready to be upserted: distinct ascending dates, distinct tickers in
 * ascending (String) order, and rows as three parallel primitive arrays sorted by (date, ticker)
 * with no key twice. Rows refer to dates and tickers by index, so a million rows cost 16 bytes each
 * and no per-row objects. Arrays are copied on the way in; rows are read one at a time.
 */
public final class ReturnBatch {
    private final LocalDate[] dates;
    private final List<String> tickers;
    private final int[] dateIndex;
    private final int[] tickerIndex;
    private final double[] values;

    /**
     * @param dates       distinct, ascending
     * @param tickers     distinct, ascending
     * @param dateIndex   per row, index into {@code dates}
     * @param tickerIndex per row, index into {@code tickers}
     * @param values      per row, the return (finite)
     * @throws IllegalArgumentException when lengths differ, an index is out of range, a value is not
     *                                  finite or rows are not strictly ascending by (date, ticker)
     */
    public ReturnBatch(List<LocalDate> dates, List<String> tickers, int[] dateIndex, int[] tickerIndex, double[] values) {
        this.dates = dates.toArray(new LocalDate[0]);
        this.tickers = List.copyOf(tickers);
        int n = values.length;
        if (dateIndex.length != n || tickerIndex.length != n) {
            throw new IllegalArgumentException("row arrays differ in length: " + dateIndex.length + ", " + tickerIndex.length + ", " + n);
        }
        for (int d = 1; d < this.dates.length; d++) {
            if (!this.dates[d - 1].isBefore(this.dates[d])) throw new IllegalArgumentException("dates not ascending at " + d);
        }
        for (int i = 1; i < this.tickers.size(); i++) {
            if (this.tickers.get(i - 1).compareTo(this.tickers.get(i)) >= 0) throw new IllegalArgumentException("tickers not ascending at " + i);
        }
        this.dateIndex = dateIndex.clone();
        this.tickerIndex = tickerIndex.clone();
        this.values = values.clone();
        for (int r = 0; r < n; r++) {
            int d = this.dateIndex[r];
            int t = this.tickerIndex[r];
            if (d < 0 || d >= this.dates.length || t < 0 || t >= this.tickers.size()) {
                throw new IllegalArgumentException("row " + r + " refers to date " + d + " / ticker " + t + " out of range");
            }
            if (!Double.isFinite(this.values[r])) throw new IllegalArgumentException("row " + r + " value not finite");
            if (r > 0) {
                int pd = this.dateIndex[r - 1];
                if (d < pd || (d == pd && t <= this.tickerIndex[r - 1])) {
                    throw new IllegalArgumentException("rows not strictly ascending by (date, ticker) at " + r);
                }
            }
        }
    }

    /** Number of rows. */
    public int size() {
        return values.length;
    }

    public List<LocalDate> dates() {
        return List.of(dates);
    }

    public List<String> tickers() {
        return tickers;
    }

    LocalDate date(int dateIdx) {
        return dates[dateIdx];
    }

    int dateCount() {
        return dates.length;
    }

    int dateIndex(int row) {
        return dateIndex[row];
    }

    int tickerIndex(int row) {
        return tickerIndex[row];
    }

    double value(int row) {
        return values[row];
    }
}
