package eigencov.store;

import eigencov.math.ReturnPanel;
import eigencov.service.NotFoundException;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

import java.time.LocalDate;
import java.util.ArrayList;
import java.util.List;
import java.util.Optional;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * The window a fit reads (docs/design.md section 3: the last windowDays distinct dates <= asOf, no
 * lookahead), on a small panel whose every value is known: value = date number + ticker / 100.
 */
class PanelStoreTest {
    private static Database db;
    private static PanelStore store;

    /** Dates of panel "w": 2025-01-06 .. 2025-01-17 on weekdays (10 dates). */
    private static final List<LocalDate> DATES = new ArrayList<>();
    private static final List<String> TICKERS = List.of("AAA", "BBB", "CCC");

    @BeforeAll
    static void fill() {
        db = TestStores.open("panelstore");
        store = new PanelStore(db);
        for (LocalDate d = LocalDate.of(2025, 1, 6); !d.isAfter(LocalDate.of(2025, 1, 17)); d = d.plusDays(1)) {
            if (d.getDayOfWeek().getValue() <= 5) DATES.add(d);
        }
        // AAA on every date; BBB misses date 8 (index 7); CCC only on the first two dates.
        List<int[]> keys = new ArrayList<>();
        for (int t = 0; t < DATES.size(); t++) {
            keys.add(new int[] {t, 0});
            if (t != 7) keys.add(new int[] {t, 1});
            if (t < 2) keys.add(new int[] {t, 2});
        }
        int n = keys.size();
        int[] d = new int[n];
        int[] k = new int[n];
        double[] v = new double[n];
        for (int i = 0; i < n; i++) {
            d[i] = keys.get(i)[0];
            k[i] = keys.get(i)[1];
            v[i] = expected(d[i], k[i]);
        }
        store.upsert("w", new ReturnBatch(DATES, TICKERS, d, k, v));
    }

    private static double expected(int dateIdx, int tickerIdx) {
        return (dateIdx + 1) / 1000.0 + tickerIdx / 100_000.0;
    }

    @AfterAll
    static void close() {
        db.close();
    }

    @Test
    void window_takes_the_last_windowDays_dates_on_or_before_asOf() {
        // asOf falls on a Saturday: the last date <= asOf is Friday 2025-01-10 (index 4).
        ReturnPanel p = store.loadWindow("w", LocalDate.of(2025, 1, 11), 3);
        assertEquals(DATES.subList(2, 5), p.dates());
        assertEquals(List.of("AAA", "BBB"), p.tickers(), "CCC has no observation in the window");
        for (int t = 0; t < 3; t++) {
            assertEquals(expected(t + 2, 0), p.value(t, 0));
            assertEquals(expected(t + 2, 1), p.value(t, 1));
        }
    }

    @Test
    void window_never_reads_returns_dated_after_asOf() {
        LocalDate asOf = DATES.get(6);
        ReturnPanel p = store.loadWindow("w", asOf, 100);
        assertEquals(DATES.subList(0, 7), p.dates());
        assertTrue(p.dates().stream().noneMatch(d -> d.isAfter(asOf)));
    }

    @Test
    void missing_observations_are_NaN_and_tickers_appear_once_seen_in_the_window() {
        ReturnPanel p = store.loadWindow("w", DATES.get(9), 10);
        assertEquals(TICKERS, p.tickers());
        assertEquals(10, p.dates().size());
        assertTrue(Double.isNaN(p.value(7, 1)), "BBB has no row on date 8");
        assertTrue(Double.isNaN(p.value(2, 2)), "CCC has rows on the first two dates only");
        assertEquals(expected(1, 2), p.value(1, 2));
        assertEquals(expected(9, 0), p.value(9, 0));
        double[] values = p.values();
        int nan = 0;
        for (double x : values) if (Double.isNaN(x)) nan++;
        assertEquals(1 + 8, nan, "one BBB gap, eight CCC gaps");
    }

    @Test
    void window_before_the_first_date_is_empty() {
        ReturnPanel p = store.loadWindow("w", DATES.get(0).minusDays(1), 5);
        assertEquals(0, p.dates().size());
        assertEquals(0, p.tickers().size());
        assertArrayEquals(new double[0], p.values());
    }

    @Test
    void window_of_one_day_on_a_date_with_a_gap_holds_only_observed_tickers() {
        ReturnPanel p = store.loadWindow("w", DATES.get(7), 1);
        assertEquals(List.of(DATES.get(7)), p.dates());
        assertEquals(List.of("AAA"), p.tickers());
    }

    @Test
    void last_date_and_dates_read_the_date_index() {
        assertEquals(Optional.of(DATES.get(9)), store.lastDate("w"));
        assertEquals(DATES.subList(2, 6), store.dates("w", DATES.get(2), DATES.get(5)));
        assertEquals(DATES, store.dates("w", null, null));
        assertEquals(DATES.subList(8, 10), store.dates("w", DATES.get(8), null));
    }

    @Test
    void unknown_panel_is_not_found_and_bad_window_is_rejected() {
        assertThrows(NotFoundException.class, () -> store.loadWindow("nope", LocalDate.of(2025, 1, 1), 5));
        assertThrows(NotFoundException.class, () -> store.lastDate("nope"));
        assertThrows(NotFoundException.class, () -> store.dates("nope", null, null));
        assertThrows(IllegalArgumentException.class, () -> store.loadWindow("w", LocalDate.of(2025, 1, 1), 0));
    }

    @Test
    void window_and_read_back_spanning_several_read_chunks_are_complete_and_ordered() throws Exception {
        // 12 dates x 2,500 tickers = 30,000 rows: more than one read chunk (20,000 rows).
        int dates = 12;
        int tickers = 2_500;
        List<LocalDate> ds = new ArrayList<>();
        for (int t = 0; t < dates; t++) ds.add(LocalDate.of(2023, 5, 1).plusDays(t));
        List<String> ts = new ArrayList<>();
        for (int k = 0; k < tickers; k++) ts.add(String.format("K%05d", k));
        int n = dates * tickers;
        int[] d = new int[n];
        int[] k = new int[n];
        double[] v = new double[n];
        for (int i = 0; i < n; i++) {
            d[i] = i / tickers;
            k[i] = i % tickers;
            v[i] = d[i] * 0.001 + k[i] * 1e-7;
        }
        store.upsert("big", new ReturnBatch(ds, ts, d, k, v));
        ReturnPanel p = store.loadWindow("big", ds.get(dates - 1), dates);
        assertEquals(ds, p.dates());
        assertEquals(ts, p.tickers());
        assertArrayEquals(v, p.values());
        long[] seen = {0};
        store.readReturns("big", List.of(), null, null, (date, ticker, value) -> {
            int i = (int) seen[0]++;
            assertEquals(ds.get(i / tickers), date);
            assertEquals(ts.get(i % tickers), ticker);
            assertEquals(v[i], value);
        });
        assertEquals(n, seen[0]);
    }

    @Test
    void upsert_counts_new_and_replaced_rows_and_keeps_the_summary_in_step() {
        List<LocalDate> dates = List.of(LocalDate.of(2024, 3, 1), LocalDate.of(2024, 3, 4));
        UpsertCounts first = store.upsert("u", new ReturnBatch(dates, List.of("X", "Y"),
                new int[] {0, 0, 1}, new int[] {0, 1, 0}, new double[] {0.1, 0.2, 0.3}));
        assertEquals(new UpsertCounts(3, 0), first);
        UpsertCounts second = store.upsert("u", new ReturnBatch(dates, List.of("X", "Y"),
                new int[] {0, 1, 1}, new int[] {1, 0, 1}, new double[] {0.25, 0.35, 0.45}));
        assertEquals(new UpsertCounts(1, 2), second);
        PanelSummary s = store.panel("u").orElseThrow();
        assertEquals(new PanelSummary("u", 2, 2, 4, dates.get(0), dates.get(1)), s);
        ReturnPanel p = store.loadWindow("u", dates.get(1), 2);
        assertArrayEquals(new double[] {0.1, 0.25, 0.35, 0.45}, p.values());
    }
}
