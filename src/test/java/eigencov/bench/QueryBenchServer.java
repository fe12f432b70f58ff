package eigencov.bench;

import com.fasterxml.jackson.databind.ObjectMapper;
import eigencov.app.App;
import eigencov.app.AppConfig;
import eigencov.math.FactorModel;
import eigencov.service.InMemoryFits;
import eigencov.service.ServedFit;
import eigencov.service.TestFits;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.LocalDate;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Random;

/**
 * Server side of {@code scripts/bench-query}: serves a seeded synthetic model (3,000 names, 504
 * days, k = 20) as model "bench" through the real App on loopback, writes the request bodies the
 * load generator sends, prints {@code READY <port>} and stays up until its standard input closes
 * or {@code --max-seconds} pass (the benchmark is bounded in time even if the script dies).
 *
 * <p>Usage: {@code QueryBenchServer --port 0 --bodies DIR --max-seconds 600}
 */
public final class QueryBenchServer {
    static final int NAMES = 3_000;
    static final int DAYS = 504;
    static final int FACTORS = 20;

    private QueryBenchServer() {
    }

    public static void main(String[] args) throws Exception {
        Map<String, String> opt = new LinkedHashMap<>(Map.of("port", "0", "bodies", "target/bench-bodies", "max-seconds", "600"));
        for (int i = 0; i + 1 < args.length; i += 2) {
            if (!args[i].startsWith("--") || !opt.containsKey(args[i].substring(2))) throw new IllegalArgumentException("unknown option " + args[i]);
            opt.put(args[i].substring(2), args[i + 1]);
        }
        long built = System.nanoTime();
        FactorModel model = TestFits.synthetic("S", NAMES, FACTORS, 42L, false);
        ServedFit fit = TestFits.served(1, "bench", LocalDate.parse("2025-06-30"), model, DAYS, List.of(), 43L);
        writeBodies(Path.of(opt.get("bodies")), model.tickers());
        App app = App.create(AppConfig.forTest("bench").withPort(Integer.parseInt(opt.get("port"))), new InMemoryFits().add(fit)).start();
        System.out.printf("READY %d (model %d names x %d factors, %d days, built in %d ms)%n", app.port(), NAMES, FACTORS, DAYS,
                (System.nanoTime() - built) / 1_000_000);
        System.out.flush();
        long deadline = System.nanoTime() + Long.parseLong(opt.get("max-seconds")) * 1_000_000_000L;
        Thread watchdog = new Thread(() -> {
            try {
                while (System.in.read() >= 0) {
                    // drain until the script closes the pipe
                }
            } catch (IOException ignored) {
                // a broken pipe also means the script is gone
            }
        });
        watchdog.setDaemon(true);
        watchdog.start();
        while (watchdog.isAlive() && System.nanoTime() < deadline) watchdog.join(200);
        app.close();
    }

    /**
     * Request bodies: covariance of 50 and 500 names, factor form of all names, risk of an all-name portfolio,
     * the inverse and the minimum-variance weights of all names.
     */
    private static void writeBodies(Path dir, List<String> tickers) throws IOException {
        Files.createDirectories(dir);
        ObjectMapper json = new ObjectMapper();
        Random rnd = new Random(44L);
        json.writeValue(dir.resolve("cov50.json").toFile(), Map.of("tickers", spread(tickers, 50)));
        json.writeValue(dir.resolve("cov500.json").toFile(), Map.of("tickers", spread(tickers, 500)));
        json.writeValue(dir.resolve("factor3000.json").toFile(), Map.of("tickers", tickers, "form", "factor"));
        Map<String, Double> w = new LinkedHashMap<>();
        for (String t : tickers) w.put(t, (0.5 + rnd.nextDouble()) / tickers.size());
        json.writeValue(dir.resolve("risk3000.json").toFile(), Map.of("weights", w));
        json.writeValue(dir.resolve("precision3000.json").toFile(), Map.of("tickers", tickers));
        json.writeValue(dir.resolve("mv3000.json").toFile(), Map.of("tickers", tickers));
    }

    /** {@code n} tickers spread over the universe, not in universe order. */
    private static List<String> spread(List<String> tickers, int n) {
        List<String> out = new ArrayList<>(n);
        int step = tickers.size() / n;
        for (int i = n - 1; i >= 0; i--) out.add(tickers.get(i * step + (i % step)));
        return out;
    }
}
