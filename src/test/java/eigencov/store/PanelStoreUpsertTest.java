package eigencov.store;

import eigencov.app.AppConfig;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

import java.io.IOException;
import java.time.LocalDate;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.TreeMap;

import static org.junit.jupiter.api.Assertions.assertEquals;

/** Upserts mixing new and existing rows, on each store's write path (JDBC batches on H2, COPY on PostgreSQL). */
class PanelStoreUpsertTest {
    private static final LocalDate D1 = LocalDate.of(2025, 3, 3);
    private static final LocalDate D2 = LocalDate.of(2025, 3, 4);
    private static final LocalDate D3 = LocalDate.of(2025, 3, 5);
    private static Database db;
    private static PanelStore store;

    @BeforeAll
    static void open() {
        db = Database.open(AppConfig.forTest("upsert").dbUrl(), "", "", 2);
        store = new PanelStore(db);
    }

    @AfterAll
    static void close() {
        db.close();
    }

    @Test
    void one_upsert_inserts_new_rows_updates_existing_ones_and_keeps_the_rest() throws IOException {
        store.upsert("mixed", new ReturnBatch(List.of(D1, D2), List.of("AA", "BB"),
                new int[] {0, 0, 1, 1}, new int[] {0, 1, 0, 1}, new double[] {0.01, 0.02, 0.03, 0.04}));
        // D2/BB and D1/AA exist; D2/CC and D3/AA are new; D1/BB and D2/AA are left alone.
        UpsertCounts counts = store.upsert("mixed", new ReturnBatch(List.of(D1, D2, D3), List.of("AA", "BB", "CC"),
                new int[] {0, 1, 1, 2}, new int[] {0, 1, 2, 0}, new double[] {-0.5, 1.0E-7, 0.123456789012345, -0.25}));
        assertEquals(new UpsertCounts(2, 2), counts);

        Map<String, Double> stored = new TreeMap<>();
        store.readReturns("mixed", List.of(), null, null, (date, ticker, value) -> stored.put(date + " " + ticker, value));
        Map<String, Double> expected = new TreeMap<>(Map.of(
                D1 + " AA", -0.5, D1 + " BB", 0.02,
                D2 + " AA", 0.03, D2 + " BB", 1.0E-7, D2 + " CC", 0.123456789012345,
                D3 + " AA", -0.25));
        assertEquals(expected, stored, "values stored exactly (shortest round-trip text on the COPY path)");
        PanelSummary summary = store.panel("mixed").orElseThrow();
        assertEquals(6, summary.rows());
        assertEquals(3, summary.tickers());
        assertEquals(3, summary.dates());
    }

    @Test
    void a_large_upsert_round_trips_every_value() throws IOException {
        int dates = 40;
        int tickers = 250;
        List<LocalDate> ds = new ArrayList<>();
        for (int d = 0; d < dates; d++) ds.add(LocalDate.of(2024, 1, 1).plusDays(d));
        List<String> ts = new ArrayList<>();
        for (int t = 0; t < tickers; t++) ts.add(String.format("T%04d", t));
        int n = dates * tickers;
        int[] di = new int[n];
        int[] ti = new int[n];
        double[] v = new double[n];
        java.util.Random rnd = new java.util.Random(42);
        for (int r = 0; r < n; r++) {
            di[r] = r / tickers;
            ti[r] = r % tickers;
            v[r] = rnd.nextGaussian() * 0.02;
        }
        assertEquals(new UpsertCounts(n, 0), store.upsert("large", new ReturnBatch(ds, ts, di, ti, v)));
        double[] w = v.clone();
        for (int r = 0; r < n; r++) w[r] = -w[r];
        assertEquals(new UpsertCounts(0, n), store.upsert("large", new ReturnBatch(ds, ts, di, ti, w)));
        double[] back = new double[n];
        int[] count = {0};
        store.readReturns("large", List.of(), null, null, (date, ticker, value) -> back[count[0]++] = value);
        assertEquals(n, count[0]);
        for (int r = 0; r < n; r++) assertEquals(w[r], back[r], 0.0, "row " + r);
    }
}
