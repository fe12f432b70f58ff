package eigencov.bench;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import eigencov.math.FactorFitter;
import eigencov.math.FactorRule;
import eigencov.math.FitOptions;
import eigencov.math.FitResult;
import eigencov.math.ImputationReport;
import eigencov.math.ReturnPanel;
import eigencov.service.Windows;
import java.io.BufferedReader;
import java.io.IOException;
import java.io.InputStreamReader;
import java.lang.management.ManagementFactory;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.LocalDate;
import java.time.YearMonth;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Map;
import java.util.TreeMap;
import java.util.TreeSet;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.zip.GZIPInputStream;

/**
 * The demo's backfill fits, timed one by one (run by scripts/bench-demo-fits; prints figures, asserts
 * nothing). Reads demo-data/returns.csv.gz and models.json, cuts each model's window at its month ends with
 * the service's own {@link Windows#cut} and prints per fit: wall ms, CPU ms, T, K, gap cells, EM iterations,
 * the last relative changes of the imputed cells and of the observed-cell objective, converged.
 *
 * <p>Arguments: {@code [every-nth-month-end] [threads]} (defaults 1 = all month ends, 2 threads;
 * threads 1 = no pool).
 */
public final class DemoFitBench {

    private DemoFitBench() {
    }

    public static void main(String[] args) throws IOException {
        int stride = args.length > 0 ? Integer.parseInt(args[0]) : 1;
        int threads = args.length > 1 ? Integer.parseInt(args[1]) : 2;
        Path dir = Path.of("demo-data");
        ReturnPanel all = readReturns(dir.resolve("returns.csv.gz"));
        JsonNode models = new ObjectMapper().readTree(dir.resolve("models.json").toFile()).path("models");
        ExecutorService pool = threads > 1 ? Executors.newFixedThreadPool(threads, r -> {
            Thread t = new Thread(r, "bench-demo-fit");
            t.setDaemon(true);
            return t;
        }) : null;
        FactorFitter fitter = new FactorFitter(pool);
        System.out.printf("demo fits: panel %d dates x %d tickers, %s, every %d. month end%n", all.rows(), all.cols(),
                pool == null ? "no pool (calling thread only)" : threads + "-thread pool", stride);
        // warm-up so the first printed fit does not carry the JIT compilation
        JsonNode first = models.get(0).path("spec");
        for (int w = 0; w < 3; w++) {
            fitter.fit(Windows.cut(all, all.dates().get(all.rows() - 1), first.path("windowDays").asInt()), options(first), null);
        }
        System.out.printf("%-20s %-10s %8s %8s %5s %5s %6s %4s %6s %11s %11s %5s%n", "model", "asOf", "wall ms", "cpu ms",
                "T", "K", "gaps", "k", "EM it", "cell chg", "obj chg", "conv");
        for (JsonNode m : models) {
            String name = m.path("name").asText();
            JsonNode spec = m.path("spec");
            int windowDays = spec.path("windowDays").asInt();
            FitOptions options = options(spec);
            List<LocalDate> ends = monthEnds(all.dates(), windowDays);
            List<Double> wall = new ArrayList<>();
            for (int e = ends.size() - 1; e >= 0; e -= stride) {
                LocalDate d = ends.get(e);
                ReturnPanel window = Windows.cut(all, d, windowDays);
                long cpu0 = processCpuNanos();
                long t0 = System.nanoTime();
                FitResult r = fitter.fit(window, options, null);
                double ms = (System.nanoTime() - t0) / 1e6;
                double cpuMs = (processCpuNanos() - cpu0) / 1e6;
                wall.add(ms);
                ImputationReport im = r.imputation();
                System.out.printf("%-20s %-10s %8.1f %8.1f %5d %5d %6d %4d %6d %11.3e %11s %5s%n", name, d, ms, cpuMs,
                        window.rows(), r.model().size(), im.cells(), r.model().factors(), im.iterations(),
                        im.finalChange(), im.objectiveChange() == null ? "-" : String.format("%.3e", im.objectiveChange()),
                        im.converged());
            }
            double[] s = wall.stream().mapToDouble(Double::doubleValue).sorted().toArray();
            System.out.printf("%-20s %d fits: median %.1f ms, max %.1f ms, total %.1f ms%n", name, s.length,
                    s[s.length / 2], s[s.length - 1], Arrays.stream(s).sum());
        }
        System.out.println("load average (1, 5, 15 min): " + loadAverage());
        if (pool != null) {
            pool.shutdownNow();
        }
    }

    private static FitOptions options(JsonNode spec) {
        JsonNode f = spec.path("factors");
        FactorRule rule = switch (f.path("rule").asText()) {
            case "fixed" -> new FactorRule.Fixed(f.path("count").asInt());
            case "bai-ng" -> new FactorRule.BaiNg(f.path("max").asInt());
            default -> throw new IllegalArgumentException("bench knows rules fixed and bai-ng, not " + f);
        };
        Double halfLife = spec.hasNonNull("halfLifeDays") ? spec.path("halfLifeDays").asDouble() : null;
        return new FitOptions(rule, halfLife, spec.path("minCoverage").asDouble(), eigencov.math.Basis.COVARIANCE,
                FitOptions.DEFAULT_SPECIFIC_FLOOR);
    }

    /** date,ticker,value rows into one T x K panel, NaN where a name has no return. */
    private static ReturnPanel readReturns(Path file) throws IOException {
        Map<LocalDate, Map<String, Double>> rows = new TreeMap<>();
        TreeSet<String> names = new TreeSet<>();
        try (BufferedReader in = new BufferedReader(new InputStreamReader(new GZIPInputStream(Files.newInputStream(file)),
                StandardCharsets.UTF_8))) {
            in.readLine();
            for (String line = in.readLine(); line != null; line = in.readLine()) {
                String[] p = line.split(",");
                names.add(p[1]);
                rows.computeIfAbsent(LocalDate.parse(p[0]), k -> new TreeMap<>()).put(p[1], Double.parseDouble(p[2]));
            }
        }
        List<String> tickers = new ArrayList<>(names);
        List<LocalDate> dates = new ArrayList<>(rows.keySet());
        double[] v = new double[dates.size() * tickers.size()];
        Arrays.fill(v, Double.NaN);
        for (int t = 0; t < dates.size(); t++) {
            Map<String, Double> row = rows.get(dates.get(t));
            for (int i = 0; i < tickers.size(); i++) {
                Double x = row.get(tickers.get(i));
                if (x != null) {
                    v[t * tickers.size() + i] = x;
                }
            }
        }
        return new ReturnPanel(dates, tickers, v);
    }

    /** As the demo loader: the last date of each month with a full window up to it. */
    private static List<LocalDate> monthEnds(List<LocalDate> dates, int windowDays) {
        List<LocalDate> out = new ArrayList<>();
        for (int i = windowDays - 1; i < dates.size(); i++) {
            if (i == dates.size() - 1 || !YearMonth.from(dates.get(i + 1)).equals(YearMonth.from(dates.get(i)))) {
                out.add(dates.get(i));
            }
        }
        return out;
    }

    private static long processCpuNanos() {
        return ((com.sun.management.OperatingSystemMXBean) ManagementFactory.getOperatingSystemMXBean())
                .getProcessCpuTime();
    }

    private static String loadAverage() {
        try {
            return Files.readString(Path.of("/proc/loadavg")).trim();
        } catch (IOException e) {
            return "unavailable";
        }
    }
}
