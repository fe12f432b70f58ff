package eigencov.store;

import eigencov.math.ReturnPanel;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

import java.sql.Connection;
import java.sql.SQLException;
import java.sql.Statement;
import java.time.LocalDate;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.List;
import java.util.Random;
import java.util.TreeSet;
import java.util.concurrent.CyclicBarrier;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.Future;
import java.util.concurrent.TimeUnit;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * Upsert into the one-row-per-date layout: merging new rows into stored days, two uploads into one
 * panel at once, and a write failing half-way. Every test uses its own panel and ticker symbols.
 */
class PanelStoreUpsertTest {
    private static Database db;
    private static PanelStore store;

    private static final LocalDate D0 = LocalDate.of(2024, 4, 1);
    private static final LocalDate D1 = D0.plusDays(1);
    private static final LocalDate D2 = D0.plusDays(2);

    private record Row(LocalDate date, String ticker, double value) {
    }

    /** The rows as a batch: dates and tickers collected and sorted, rows in (date, ticker) order. */
    private static ReturnBatch batch(List<Row> rows) {
        List<Row> sorted = new ArrayList<>(rows);
        sorted.sort(Comparator.comparing(Row::date).thenComparing(Row::ticker));
        TreeSet<LocalDate> dates = new TreeSet<>();
        TreeSet<String> tickers = new TreeSet<>();
        for (Row r : sorted) {
            dates.add(r.date());
            tickers.add(r.ticker());
        }
        List<LocalDate> ds = new ArrayList<>(dates);
        List<String> ts = new ArrayList<>(tickers);
        int n = sorted.size();
        int[] d = new int[n];
        int[] k = new int[n];
        double[] v = new double[n];
        for (int i = 0; i < n; i++) {
            d[i] = ds.indexOf(sorted.get(i).date());
            k[i] = ts.indexOf(sorted.get(i).ticker());
            v[i] = sorted.get(i).value();
        }
        return new ReturnBatch(ds, ts, d, k, v);
    }

    private static List<Row> readBack(String panel, List<String> tickers) throws Exception {
        List<Row> out = new ArrayList<>();
        store.readReturns(panel, tickers, null, null, (date, ticker, value) -> out.add(new Row(date, ticker, value)));
        return out;
    }

    @BeforeAll
    static void open() {
        db = TestStores.open("panelupsert");
        store = new PanelStore(db);
    }

    @AfterAll
    static void close() {
        db.close();
    }

    @Test
    void merge_adds_new_tickers_replaces_existing_values_and_keeps_symbol_order() throws Exception {
        store.upsert("m", batch(List.of(
                new Row(D0, "MB", 0.01), new Row(D0, "MD", 0.02),
                new Row(D1, "MB", 0.03), new Row(D1, "MD", 0.04))));
        // MA and MC are interned after MD, so their ids are larger although their symbols sort first:
        // the merge must order the new rows by id and the reads by symbol.
        UpsertCounts counts = store.upsert("m", batch(List.of(
                new Row(D1, "MA", 0.05), new Row(D1, "MC", 0.06), new Row(D1, "MD", 0.07),
                new Row(D2, "MA", 0.08), new Row(D2, "MD", 0.09))));
        assertEquals(new UpsertCounts(4, 1), counts, "one (date, ticker) existed: D1/MD");
        assertEquals(new PanelSummary("m", 4, 3, 8, D0, D2), store.panel("m").orElseThrow());

        ReturnPanel p = store.loadWindow("m", D2, 3);
        assertEquals(List.of("MA", "MB", "MC", "MD"), p.tickers());
        double nan = Double.NaN;
        assertArrayEquals(new double[] {
            nan, 0.01, nan, 0.02,
            0.05, 0.03, 0.06, 0.07,
            0.08, nan, nan, 0.09}, p.values());

        assertEquals(List.of(
                new Row(D0, "MB", 0.01), new Row(D0, "MD", 0.02),
                new Row(D1, "MA", 0.05), new Row(D1, "MB", 0.03), new Row(D1, "MC", 0.06), new Row(D1, "MD", 0.07),
                new Row(D2, "MA", 0.08), new Row(D2, "MD", 0.09)), readBack("m", List.of()));
        assertEquals(List.of(new Row(D0, "MD", 0.02), new Row(D1, "MA", 0.05), new Row(D1, "MD", 0.07), new Row(D2, "MA", 0.08), new Row(D2, "MD", 0.09)),
                readBack("m", List.of("MD", "MA", "NOT-IN-PANEL")));
        assertEquals(List.of(), readBack("m", List.of("NOT-IN-PANEL")));
    }

    @Test
    void reupload_of_the_same_rows_updates_every_one_and_adds_nothing() {
        List<Row> rows = List.of(new Row(D0, "RA", 0.1), new Row(D0, "RB", 0.2), new Row(D1, "RB", 0.3));
        assertEquals(new UpsertCounts(3, 0), store.upsert("r", batch(rows)));
        assertEquals(new UpsertCounts(0, 3), store.upsert("r", batch(rows)));
        assertEquals(new PanelSummary("r", 2, 2, 3, D0, D1), store.panel("r").orElseThrow());
    }

    @Test
    void two_concurrent_uploads_into_one_panel_both_land_and_counts_add_up() throws Exception {
        // The panel already holds every date (one ticker), so both uploads rewrite the same day
        // rows; each adds 300 own tickers and 10 shared ones on 40 dates, the shared keys twice.
        int dates = 40;
        List<Row> seed = new ArrayList<>();
        List<Row> a = new ArrayList<>();
        List<Row> b = new ArrayList<>();
        Random rnd = new Random(20250514L);
        for (int t = 0; t < dates; t++) {
            LocalDate d = LocalDate.of(2023, 1, 2).plusDays(t);
            seed.add(new Row(d, "CP", t * 0.001));
            for (int k = 0; k < 300; k++) {
                a.add(new Row(d, String.format("CA%03d", k), rnd.nextGaussian() * 0.01));
                b.add(new Row(d, String.format("CB%03d", k), rnd.nextGaussian() * 0.01));
            }
            for (int k = 0; k < 10; k++) {
                a.add(new Row(d, "CS" + k, 0.5 + t * 0.001 + k * 1e-5));
                b.add(new Row(d, "CS" + k, -0.5 - t * 0.001 - k * 1e-5));
            }
        }
        store.upsert("c", batch(seed));
        CyclicBarrier start = new CyclicBarrier(2);
        ExecutorService pool = Executors.newFixedThreadPool(2);
        UpsertCounts ca;
        UpsertCounts cb;
        try {
            Future<UpsertCounts> fa = pool.submit(() -> {
                start.await();
                return store.upsert("c", batch(a));
            });
            Future<UpsertCounts> fb = pool.submit(() -> {
                start.await();
                return store.upsert("c", batch(b));
            });
            ca = fa.get(2, TimeUnit.MINUTES);
            cb = fb.get(2, TimeUnit.MINUTES);
        } finally {
            pool.shutdownNow();
        }
        int shared = dates * 10;
        assertEquals(a.size(), ca.inserted() + ca.updated());
        assertEquals(b.size(), cb.inserted() + cb.updated());
        assertEquals((long) dates * 610, ca.inserted() + cb.inserted(), "every distinct key inserted once");
        assertTrue(ca.updated() == 0 && cb.updated() == shared || ca.updated() == shared && cb.updated() == 0,
                "one upload came second and replaced exactly the shared keys: " + ca + ", " + cb);
        List<Row> winner = cb.updated() == shared ? b : a;

        assertEquals(new PanelSummary("c", 611, dates, dates * 611L, a.get(0).date(), a.get(a.size() - 1).date()),
                store.panel("c").orElseThrow());
        List<Row> expected = new ArrayList<>(seed);
        expected.addAll(winner);
        for (Row r : winner == a ? b : a) if (!r.ticker().startsWith("CS")) expected.add(r);
        expected.sort(Comparator.comparing(Row::date).thenComparing(Row::ticker));
        assertEquals(expected, readBack("c", List.of()), "nothing lost, shared keys hold the later upload's values");
    }

    @Test
    void a_write_failing_part_way_leaves_the_panel_as_it_was() throws Exception {
        store.upsert("f", batch(List.of(new Row(D0, "FA", 0.1), new Row(D0, "FB", 0.2), new Row(D1, "FA", 0.3))));
        List<Row> before = readBack("f", List.of());
        PanelSummary summaryBefore = store.panel("f").orElseThrow();

        // The upload updates the stored dates, adds a ticker and 70 new dates (more than one write
        // chunk), the last of which the database refuses: everything written before must go too.
        LocalDate refused = D1.plusDays(70);
        List<Row> rows = new ArrayList<>(List.of(new Row(D0, "FA", 0.9), new Row(D1, "FC", 0.8)));
        for (LocalDate d = D1.plusDays(1); !d.isAfter(refused); d = d.plusDays(1)) rows.add(new Row(d, "FB", 0.01));
        ReturnBatch upload = batch(rows);
        execute("ALTER TABLE panel_day ADD CONSTRAINT refuse_one_date CHECK (obs_date <> DATE '" + refused + "')");
        try {
            assertThrows(StoreException.class, () -> store.upsert("f", upload));
        } finally {
            execute("ALTER TABLE panel_day DROP CONSTRAINT refuse_one_date");
        }
        assertEquals(summaryBefore, store.panel("f").orElseThrow());
        assertEquals(before, readBack("f", List.of()));
        assertEquals(List.of(D0, D1), store.dates("f", null, null));

        // The same upload goes through once the database accepts it: the failure left no trace.
        assertEquals(new UpsertCounts(rows.size() - 1, 1), store.upsert("f", upload));
        assertEquals(new PanelSummary("f", 3, 72, 3 + rows.size() - 1, D0, refused), store.panel("f").orElseThrow());
    }

    private static void execute(String sql) throws SQLException {
        try (Connection c = db.dataSource().getConnection(); Statement s = c.createStatement()) {
            s.execute(sql);
        }
    }
}
