import eigencov.math.ReturnPanel;
import eigencov.store.Database;
import eigencov.store.PanelStore;

import java.time.LocalDate;

/**
 * Times PanelStore.loadWindow on an existing store: {@code java -cp target/eigencov.jar
 * scripts/WindowBench.java JDBC_URL PANEL WINDOW_DAYS}. Prints the shape and the time of five
 * loads (the first includes JIT warm-up and a cold H2 page cache).
 */
public class WindowBench {
    public static void main(String[] args) {
        try (Database db = Database.open(args[0], "", "", 2)) {
            PanelStore store = new PanelStore(db);
            int window = Integer.parseInt(args[2]);
            LocalDate asOf = store.lastDate(args[1]).orElseThrow();
            for (int i = 1; i <= 5; i++) {
                long t0 = System.nanoTime();
                ReturnPanel p = store.loadWindow(args[1], asOf, window);
                long ms = (System.nanoTime() - t0) / 1_000_000;
                int nan = 0;
                for (int t = 0; t < p.dates().size(); t++) for (int k = 0; k < p.tickers().size(); k++) if (Double.isNaN(p.value(t, k))) nan++;
                System.out.printf("   load %d: %d dates x %d tickers (%d missing) in %d ms%n", i, p.dates().size(), p.tickers().size(), nan, ms);
            }
        }
    }
}
