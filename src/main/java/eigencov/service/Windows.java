package eigencov.service;

import eigencov.math.ReturnPanel;

import java.time.LocalDate;
import java.util.ArrayList;
import java.util.Collections;
import java.util.List;

/** Cuts fit windows out of a longer panel already read from the store. */
final class Windows {
    private Windows() {
    }

    /**
     * The last {@code windowDays} dates of {@code all} on or before {@code asOf}, keeping only tickers
     * with at least one return in them: the same window the store would read as of that date.
     */
    static ReturnPanel cut(ReturnPanel all, LocalDate asOf, int windowDays) {
        int end = Collections.binarySearch(all.dates(), asOf);
        end = end >= 0 ? end + 1 : -end - 1;
        int start = Math.max(0, end - windowDays);
        int rows = end - start;
        List<Integer> keep = new ArrayList<>();
        for (int i = 0; i < all.cols(); i++) {
            for (int t = start; t < end; t++) {
                if (all.observed(t, i)) {
                    keep.add(i);
                    break;
                }
            }
        }
        int cols = keep.size();
        double[] v = new double[rows * cols];
        List<String> tickers = new ArrayList<>(cols);
        for (int c = 0; c < cols; c++) tickers.add(all.tickers().get(keep.get(c)));
        for (int t = 0; t < rows; t++) {
            for (int c = 0; c < cols; c++) v[t * cols + c] = all.value(start + t, keep.get(c));
        }
        return new ReturnPanel(all.dates().subList(start, end), tickers, v);
    }
}
