package eigencov.bench;

import eigencov.math.ReturnPanel;
import eigencov.store.Database;
import eigencov.store.PanelStore;

import java.time.LocalDate;
import java.util.Arrays;
import java.util.Locale;

/**
 * Times reading a fit window from the store into the engine's panel ({@link PanelStore#loadWindow}),
 * the load step of every refit. Run by {@code scripts/bench-store}; prints one line of figures.
 *
 * <p>Usage: {@code WindowReadBench JDBC_URL PANEL AS_OF WINDOW_DAYS RUNS}.
 */
public final class WindowReadBench {
    private WindowReadBench() {
    }

    public static void main(String[] args) {
        String url = args[0];
        String panel = args[1];
        LocalDate asOf = LocalDate.parse(args[2]);
        int windowDays = Integer.parseInt(args[3]);
        int runs = Integer.parseInt(args[4]);
        try (Database db = Database.open(url, "", "", 2)) {
            PanelStore store = new PanelStore(db);
            ReturnPanel first = store.loadWindow(panel, asOf, windowDays); // warm-up: class loading, JIT, caches
            long[] ms = new long[runs];
            for (int i = 0; i < runs; i++) {
                long t0 = System.nanoTime();
                ReturnPanel p = store.loadWindow(panel, asOf, windowDays);
                ms[i] = (System.nanoTime() - t0) / 1_000_000;
                if (p.rows() != first.rows() || p.cols() != first.cols()) throw new IllegalStateException("window changed between runs");
            }
            Arrays.sort(ms);
            System.out.printf(Locale.ROOT, "window %d x %d from %s: best %d ms, median %d ms (%d runs)%n",
                    first.rows(), first.cols(), db.dialect(), ms[0], ms[runs / 2], runs);
        }
    }
}
