package eigencov.service;

import eigencov.service.InvalidInputException.Issue;
import eigencov.store.ReturnBatch;

import java.time.DateTimeException;
import java.time.LocalDate;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashMap;
import java.util.List;
import java.util.Map;

/**
 * Validates incoming return rows one field at a time and keeps the good ones in primitive arrays
 * (no object per row), then sorts them by (date, ticker) into a {@link ReturnBatch}. Readers of
 * each body format call {@link #beginRow}, the field setters and {@link #endRow}; every problem is
 * recorded with its 1-based data row and field, up to {@link #MAX_ISSUES} of them.
 *
 * <p>Rules: date {@code YYYY-MM-DD} and a real calendar day; ticker {@code [A-Za-z0-9._:/-]{1,32}};
 * value finite, {@code > -1} (a simple return cannot lose more than everything) and
 * {@code |value| <= maxAbsReturn}. The same (date, ticker) twice with different values is an error;
 * repeated with the identical value it is stored once.
 */
final class ReturnBatchBuilder {
    static final int MAX_ISSUES = 100;
    static final int MAX_TICKER_LENGTH = 32;

    private final double maxAbsReturn;
    private final List<Issue> issues = new ArrayList<>();
    private long issueCount;

    private final Map<String, Integer> tickerIndex = new HashMap<>();
    private final List<String> tickers = new ArrayList<>();
    private final IntIntMap dayIndex = new IntIntMap();
    private int[] days = new int[64];

    private int[] rowDate = new int[1024];
    private int[] rowTicker = new int[1024];
    private double[] rowValue = new double[1024];
    /** 1-based source row of each kept row, for locating duplicate keys. */
    private long[] rowSource = new long[1024];
    private int kept;
    private long received;

    // The row being read.
    private long row;
    private boolean hasDate;
    private boolean hasTicker;
    private boolean hasValue;
    private boolean rowBad;
    private int curDate;
    private int curTicker;
    private double curValue;
    private String lastDateText;
    private int lastDateIdx;

    ReturnBatchBuilder(double maxAbsReturn) {
        this.maxAbsReturn = maxAbsReturn;
    }

    /** Starts data row {@code row} (1-based). */
    void beginRow(long row) {
        this.row = row;
        received++;
        hasDate = hasTicker = hasValue = rowBad = false;
    }

    void date(String text) {
        hasDate = true;
        if (text.equals(lastDateText)) {
            curDate = lastDateIdx;
            return;
        }
        int day = parseDay(text);
        if (day == Integer.MIN_VALUE) return;
        int idx = dayIndex.get(day);
        if (idx < 0) {
            idx = dayIndex.size();
            dayIndex.put(day, idx);
            if (idx == days.length) days = Arrays.copyOf(days, days.length * 2);
            days[idx] = day;
        }
        curDate = idx;
        lastDateText = text;
        lastDateIdx = idx;
    }

    private int parseDay(String s) {
        boolean shape = s.length() == 10 && s.charAt(4) == '-' && s.charAt(7) == '-';
        for (int i = 0; shape && i < 10; i++) {
            if (i != 4 && i != 7 && (s.charAt(i) < '0' || s.charAt(i) > '9')) shape = false;
        }
        if (!shape) {
            invalid("date", "must be a date YYYY-MM-DD, was '" + clip(s) + "'");
            return Integer.MIN_VALUE;
        }
        int y = digits(s, 0, 4);
        int m = digits(s, 5, 7);
        int d = digits(s, 8, 10);
        try {
            return (int) LocalDate.of(y, m, d).toEpochDay();
        } catch (DateTimeException e) {
            invalid("date", "'" + s + "' is not a calendar date");
            return Integer.MIN_VALUE;
        }
    }

    private static int digits(String s, int from, int to) {
        int v = 0;
        for (int i = from; i < to; i++) v = v * 10 + (s.charAt(i) - '0');
        return v;
    }

    void ticker(String text) {
        hasTicker = true;
        Integer idx = tickerIndex.get(text);
        if (idx != null) {
            curTicker = idx;
            return;
        }
        String problem = tickerProblem(text);
        if (problem != null) {
            invalid("ticker", problem);
            return;
        }
        curTicker = tickers.size();
        tickers.add(text);
        tickerIndex.put(text, curTicker);
    }

    /** Why {@code s} is not a valid ticker, or null when it is. */
    static String tickerProblem(String s) {
        if (s.isEmpty()) return "must not be empty";
        if (s.length() > MAX_TICKER_LENGTH) return "must be at most " + MAX_TICKER_LENGTH + " characters, was " + s.length();
        for (int i = 0; i < s.length(); i++) {
            char ch = s.charAt(i);
            boolean ok = (ch >= 'A' && ch <= 'Z') || (ch >= 'a' && ch <= 'z') || (ch >= '0' && ch <= '9')
                    || ch == '.' || ch == '_' || ch == ':' || ch == '/' || ch == '-';
            if (!ok) return "must match [A-Za-z0-9._:/-]{1,32}, '" + clip(s) + "' has '" + ch + "' at position " + (i + 1);
        }
        return null;
    }

    /** A value as text (CSV): a decimal number, optionally with exponent. */
    void valueText(String text) {
        String t = text.strip();
        if (t.isEmpty()) {
            invalid("value", "must not be empty");
            return;
        }
        boolean numeric = true;
        for (int i = 0; i < t.length() && numeric; i++) {
            char ch = t.charAt(i);
            numeric = (ch >= '0' && ch <= '9') || ch == '.' || ch == '-' || ch == '+' || ch == 'e' || ch == 'E';
        }
        if (!numeric) {
            String l = t.toLowerCase(java.util.Locale.ROOT).replace("+", "").replace("-", "");
            if (l.equals("nan") || l.equals("inf") || l.equals("infinity")) invalid("value", "must be finite, was '" + t + "'");
            else invalid("value", "must be a number, was '" + clip(t) + "'");
            return;
        }
        double v;
        try {
            v = com.fasterxml.jackson.core.io.NumberInput.parseDouble(t, true);
        } catch (NumberFormatException e) {
            invalid("value", "must be a number, was '" + clip(t) + "'");
            return;
        }
        value(v);
    }

    /** A value already parsed as a number (JSON). */
    void value(double v) {
        hasValue = true;
        if (!Double.isFinite(v)) {
            invalid("value", "must be finite, was " + v);
        } else if (v <= -1) {
            invalid("value", "must be greater than -1 (a simple return cannot lose more than 100 %), was " + v);
        } else if (Math.abs(v) > maxAbsReturn) {
            invalid("value", "|value| must be at most " + maxAbsReturn + ", was " + v);
        } else {
            curValue = v;
        }
    }

    /** Records a problem with {@code field} of the current row; the field counts as present. */
    void invalid(String field, String message) {
        switch (field) {
            case "date" -> hasDate = true;
            case "ticker" -> hasTicker = true;
            case "value" -> hasValue = true;
            default -> { }
        }
        rowBad = true;
        issue(row, field, message);
    }

    /** Records a problem with the current row as a whole (field may be null); its fields count as present. */
    void invalidRow(String field, String message) {
        hasDate = hasTicker = hasValue = true;
        rowBad = true;
        issue(row, field, message);
    }

    /** Records a problem not tied to a single row or field (row and field may be null). */
    void issue(Long row, String field, String message) {
        issueCount++;
        if (issues.size() < MAX_ISSUES) issues.add(new Issue(row, field, message));
    }

    void endRow() {
        if (!hasDate) invalid("date", "missing");
        if (!hasTicker) invalid("ticker", "missing");
        if (!hasValue) invalid("value", "missing");
        if (rowBad || issueCount > 0) return; // once anything is wrong nothing is stored: stop keeping rows
        if (kept == rowDate.length) {
            int n = kept + (kept >> 1);
            rowDate = Arrays.copyOf(rowDate, n);
            rowTicker = Arrays.copyOf(rowTicker, n);
            rowValue = Arrays.copyOf(rowValue, n);
            rowSource = Arrays.copyOf(rowSource, n);
        }
        rowDate[kept] = curDate;
        rowTicker[kept] = curTicker;
        rowValue[kept] = curValue;
        rowSource[kept] = row;
        kept++;
    }

    boolean hasIssues() {
        return issueCount > 0;
    }

    long received() {
        return received;
    }

    /** Throws the collected problems, if any, as one {@link InvalidInputException}. */
    void throwIfInvalid() {
        if (issueCount == 0) return;
        Issue first = issues.get(0);
        String where = (first.row() == null ? "" : "row " + first.row() + " ") + (first.field() == null ? "" : first.field() + ": ");
        String more = issueCount == 1 ? "" : " (and " + (issueCount - 1) + " more" + (issueCount > MAX_ISSUES ? ", first " + MAX_ISSUES + " listed" : "") + ")";
        throw new InvalidInputException("nothing was stored: " + where + first.message() + more, issues);
    }

    /**
     * Sorts the kept rows by (date, ticker) with two stable counting passes, drops identical
     * repeats, rejects conflicting ones, and returns the batch.
     *
     * @throws InvalidInputException when any row was invalid or a key repeats with another value
     */
    ReturnBatch build() {
        throwIfInvalid();
        int nDates = dayIndex.size();
        int nTickers = tickers.size();
        // Rank dates and tickers by their natural order.
        Integer[] dOrder = new Integer[nDates];
        for (int i = 0; i < nDates; i++) dOrder[i] = i;
        Arrays.sort(dOrder, (a, b) -> Integer.compare(days[a], days[b]));
        int[] dRank = new int[nDates];
        List<LocalDate> dates = new ArrayList<>(nDates);
        for (int r = 0; r < nDates; r++) {
            dRank[dOrder[r]] = r;
            dates.add(LocalDate.ofEpochDay(days[dOrder[r]]));
        }
        Integer[] tOrder = new Integer[nTickers];
        for (int i = 0; i < nTickers; i++) tOrder[i] = i;
        Arrays.sort(tOrder, (a, b) -> tickers.get(a).compareTo(tickers.get(b)));
        int[] tRank = new int[nTickers];
        List<String> sortedTickers = new ArrayList<>(nTickers);
        for (int r = 0; r < nTickers; r++) {
            tRank[tOrder[r]] = r;
            sortedTickers.add(tickers.get(tOrder[r]));
        }
        for (int i = 0; i < kept; i++) {
            rowDate[i] = dRank[rowDate[i]];
            rowTicker[i] = tRank[rowTicker[i]];
        }
        int[] byTicker = countingSort(identity(kept), rowTicker, nTickers);
        int[] order = countingSort(byTicker, rowDate, nDates);

        int[] d = new int[kept];
        int[] t = new int[kept];
        double[] v = new double[kept];
        int m = 0;
        for (int i = 0; i < kept; i++) {
            int r = order[i];
            if (m > 0 && d[m - 1] == rowDate[r] && t[m - 1] == rowTicker[r]) {
                int prev = order[i - 1];
                if (Double.doubleToLongBits(v[m - 1]) != Double.doubleToLongBits(rowValue[r])) {
                    issue(rowSource[r], "value", "date " + dates.get(rowDate[r]) + " and ticker " + sortedTickers.get(rowTicker[r])
                            + " already given at row " + rowSource[prev] + " with value " + rowValue[prev] + ", here " + rowValue[r]);
                }
                continue;
            }
            d[m] = rowDate[r];
            t[m] = rowTicker[r];
            v[m] = rowValue[r];
            m++;
        }
        throwIfInvalid();
        return new ReturnBatch(dates, sortedTickers, Arrays.copyOf(d, m), Arrays.copyOf(t, m), Arrays.copyOf(v, m));
    }

    private static int[] identity(int n) {
        int[] a = new int[n];
        for (int i = 0; i < n; i++) a[i] = i;
        return a;
    }

    /** Stable counting sort of the row indices {@code in} by {@code key[row]} in [0, buckets). */
    private static int[] countingSort(int[] in, int[] key, int buckets) {
        int[] start = new int[buckets + 1];
        for (int r : in) start[key[r] + 1]++;
        for (int b = 0; b < buckets; b++) start[b + 1] += start[b];
        int[] out = new int[in.length];
        for (int r : in) out[start[key[r]]++] = r;
        return out;
    }

    private static String clip(String s) {
        return s.length() <= 40 ? s : s.substring(0, 40) + "...";
    }

    /** Open-addressing int -> int map (absent = -1) for interning dates without boxing. */
    private static final class IntIntMap {
        private int[] keys = new int[64];
        private int[] vals = new int[64];
        private boolean[] used = new boolean[64];
        private int size;

        int get(int k) {
            int mask = keys.length - 1;
            for (int i = mix(k) & mask; used[i]; i = (i + 1) & mask) {
                if (keys[i] == k) return vals[i];
            }
            return -1;
        }

        void put(int k, int v) {
            if (2 * (size + 1) > keys.length) grow();
            int mask = keys.length - 1;
            int i = mix(k) & mask;
            while (used[i] && keys[i] != k) i = (i + 1) & mask;
            if (!used[i]) size++;
            used[i] = true;
            keys[i] = k;
            vals[i] = v;
        }

        int size() {
            return size;
        }

        private void grow() {
            int[] ok = keys;
            int[] ov = vals;
            boolean[] ou = used;
            keys = new int[ok.length * 2];
            vals = new int[ok.length * 2];
            used = new boolean[ok.length * 2];
            size = 0;
            for (int i = 0; i < ok.length; i++) if (ou[i]) put(ok[i], ov[i]);
        }

        private static int mix(int k) {
            int h = k * 0x9E3779B9;
            return h ^ (h >>> 16);
        }
    }
}
