package eigencov.bench;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import eigencov.app.App;
import eigencov.app.AppConfig;

import java.io.IOException;
import java.io.InputStream;
import java.lang.management.ManagementFactory;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.time.LocalDate;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.Random;
import java.util.zip.GZIPInputStream;

/**
 * Evaluation benchmark (run by scripts/bench-evaluate; prints figures, asserts nothing). Through the real
 * App on loopback, with an H2 file store under target/bench-evaluate:
 * <ol>
 * <li>the demo's two models (demo-data), weekly over the last year where both have a full window,
 *     horizon 5, 100 random portfolios of 50 names, both baselines: first with no fit stored (every
 *     forecast is fitted and stored), then the same request again (every forecast reused);</li>
 * <li>a synthetic 3,000-name panel (10 planted factors, no gaps), a 504-day fixed-20 model, weekly
 *     over the last 252 trading dates, horizon 5, 100 random portfolios, both baselines: cold, then warm.</li>
 * </ol>
 * Each line: wall time from the POST to the job's end (the job's own start-to-end in brackets), fits made,
 * forecast dates, and each result's headline numbers. Arguments: none.
 */
public final class EvaluateBench {
    private static final ObjectMapper JSON = new ObjectMapper();
    private static final HttpClient HTTP = HttpClient.newHttpClient();
    private static String base;

    private EvaluateBench() {
    }

    public static void main(String[] args) throws Exception {
        Path dir = Path.of("target/bench-evaluate");
        deleteTree(dir);
        Files.createDirectories(dir);
        AppConfig config = AppConfig.defaults().withPort(0).withDbUrl("jdbc:h2:file:" + dir.resolve("db").toAbsolutePath());
        System.out.printf("cores %d, max heap %d MB, load average before: %s%n", Runtime.getRuntime().availableProcessors(),
                Runtime.getRuntime().maxMemory() >> 20, loadAverage());
        try (App app = App.create(config).start()) {
            base = "http://127.0.0.1:" + app.port();
            demo(app);
            synthetic(app);
        }
        System.out.printf("load average after: %s%n", loadAverage());
    }

    private static void demo(App app) throws Exception {
        long t0 = System.nanoTime();
        byte[] csv;
        try (InputStream in = new GZIPInputStream(Files.newInputStream(Path.of("demo-data/returns.csv.gz")))) {
            csv = in.readAllBytes();
        }
        send("POST", "/v1/panels/vellmoor/returns", "text/csv", csv, 200);
        JsonNode models = JSON.readTree(Path.of("demo-data/models.json").toFile()).path("models");
        List<String> names = new ArrayList<>();
        int window = 0;
        for (JsonNode m : models) {
            names.add(m.path("name").asText());
            window = Math.max(window, m.path("spec").path("windowDays").asInt());
            send("PUT", "/v1/models/" + m.path("name").asText(), "application/json", JSON.writeValueAsBytes(m.path("spec")), 201);
        }
        List<LocalDate> dates = dates(csv);
        LocalDate to = dates.get(dates.size() - 1);
        LocalDate from = to.minusDays(365);
        if (from.isBefore(dates.get(window - 1))) from = dates.get(window - 1);
        System.out.printf("%ndemo: panel loaded and models created in %d ms; %s, weekly %s..%s, horizon 5, 100 random x 50 names, sample + ledoit-wolf%n",
                (System.nanoTime() - t0) / 1_000_000, names, from, to);
        String body = JSON.writeValueAsString(new Request(names, from.toString(), to.toString()));
        run(app, "demo, no fit stored (cold)", body);
        run(app, "demo, fits reused (warm)", body);
    }

    private static void synthetic(App app) throws Exception {
        int names = 3_000;
        int days = 504 + 252 + 5;
        long t0 = System.nanoTime();
        Random rnd = new Random(2026);
        int k = 10;
        double[][] b = new double[names][k];
        double[] sd = new double[names];
        for (int i = 0; i < names; i++) {
            b[i][0] = 0.6 + 0.8 * rnd.nextDouble();
            for (int j = 1; j < k; j++) b[i][j] = rnd.nextGaussian() * 0.5;
            sd[i] = 0.01 + 0.01 * rnd.nextDouble();
        }
        LocalDate d = LocalDate.of(2022, 1, 3);
        List<LocalDate> all = new ArrayList<>();
        while (all.size() < days) {
            if (d.getDayOfWeek().getValue() <= 5) all.add(d);
            d = d.plusDays(1);
        }
        for (int start = 0; start < days; start += 40) {
            StringBuilder csv = new StringBuilder(names * 40 * 24).append("date,ticker,value\n");
            for (int t = start; t < Math.min(days, start + 40); t++) {
                double[] f = new double[k];
                for (int j = 0; j < k; j++) f[j] = (j == 0 ? 0.01 : 0.004) * rnd.nextGaussian();
                for (int i = 0; i < names; i++) {
                    double x = sd[i] * rnd.nextGaussian();
                    for (int j = 0; j < k; j++) x += b[i][j] * f[j];
                    csv.append(all.get(t)).append(",S").append(i).append(',').append(String.format(Locale.ROOT, "%.8f", x)).append('\n');
                }
            }
            send("POST", "/v1/panels/synth/returns", "text/csv", csv.toString().getBytes(java.nio.charset.StandardCharsets.UTF_8), 200);
        }
        send("PUT", "/v1/models/synth-504-f20", "application/json", ("{\"panel\": \"synth\", \"windowDays\": 504, \"factors\": {\"rule\": "
                + "\"fixed\", \"count\": 20}, \"minCoverage\": 0.9, \"basis\": \"covariance\"}").getBytes(java.nio.charset.StandardCharsets.UTF_8), 201);
        LocalDate to = all.get(days - 1);
        LocalDate from = all.get(days - 252);
        System.out.printf("%nsynthetic: %d names x %d dates loaded in %d ms; synth-504-f20, weekly %s..%s, horizon 5, 100 random x 50 names, "
                + "sample + ledoit-wolf%n", names, days, (System.nanoTime() - t0) / 1_000_000, from, to);
        String body = JSON.writeValueAsString(new Request(List.of("synth-504-f20"), from.toString(), to.toString()));
        run(app, "3,000 names, no fit stored (cold)", body);
        run(app, "3,000 names, fits reused (warm)", body);
    }

    /** The request both cases send. */
    private record Request(List<String> models, String from, String to, String every, int horizonDays, Random random, List<String> baselines) {
        Request(List<String> models, String from, String to) {
            this(models, from, to, "week", 5, new Random(100, 50, 1), List.of("sample", "ledoit-wolf"));
        }

        record Random(int count, int names, long seed) {
        }
    }

    private static void run(App app, String label, String body) throws Exception {
        long cpu0 = processCpuNanos();
        long t0 = System.nanoTime();
        JsonNode job = JSON.readTree(send("POST", "/v1/evaluations", "application/json", body.getBytes(java.nio.charset.StandardCharsets.UTF_8), 202));
        long id = job.path("id").asLong();
        app.jobs().runner().awaitFinished(id, Duration.ofMinutes(30)).orElseThrow();
        double wall = (System.nanoTime() - t0) / 1e9;
        double cpu = (processCpuNanos() - cpu0) / 1e9;
        JsonNode e = JSON.readTree(send("GET", "/v1/evaluations/" + id, null, null, 200));
        double own = Duration.between(java.time.Instant.parse(e.path("startedAt").asText()), java.time.Instant.parse(e.path("finishedAt").asText()))
                .toMillis() / 1e3;
        long made = 0;
        for (JsonNode m : e.path("request").path("models")) {
            for (JsonNode f : JSON.readTree(send("GET", "/v1/models/" + m.asText() + "/fits", null, null, 200)).path("fits")) {
                if (f.path("origin").asText().equals("evaluation") && f.path("createdAt").asText().compareTo(e.path("startedAt").asText()) >= 0) made++;
            }
        }
        System.out.printf("  %-36s %6.2f s wall (job %.2f s, process CPU %.2f s), state %s, %d forecast dates, %d fits made%n", label, wall, own,
                cpu, e.path("state").asText(), e.path("dates").size(), made);
        if (label.contains("warm")) return;
        for (JsonNode r : e.path("results")) {
            JsonNode f = r.path("families");
            System.out.printf(Locale.ROOT, "    %-30s equal b %.3f [%.3f, %.3f] q %.3f | single median %.3f inside %.0f %% | random median %.3f inside %.0f %%"
                            + " | min-var %s | loglik %s%n",
                    r.path("model").asText() + (r.has("baseline") ? " / " + r.path("baseline").asText() : ""),
                    f.path("equal").path("bias").asDouble(), f.path("equal").path("band").path(0).asDouble(),
                    f.path("equal").path("band").path(1).asDouble(), f.path("equal").path("qlike").asDouble(),
                    f.path("single").path("median").asDouble(), 100 * f.path("single").path("insideBand").asDouble(),
                    f.path("random").path("median").asDouble(), 100 * f.path("random").path("insideBand").asDouble(),
                    f.path("minimum-variance").isNull() ? "n/a" : String.format(Locale.ROOT, "b %.3f vol %.2f %% turnover %.2f",
                            f.path("minimum-variance").path("bias").asDouble(), 100 * f.path("minimum-variance").path("realisedVolatility").asDouble(),
                            f.path("minimum-variance").path("turnover").asDouble()),
                    r.path("logLikelihood").isNumber() ? String.format(Locale.ROOT, "%.1f", r.path("logLikelihood").asDouble()) : "n/a");
        }
    }

    /** The distinct dates of a {@code date,ticker,value} CSV, ascending. */
    private static List<LocalDate> dates(byte[] csv) {
        java.util.TreeSet<LocalDate> out = new java.util.TreeSet<>();
        String text = new String(csv, java.nio.charset.StandardCharsets.UTF_8);
        for (String line : text.split("\n")) {
            if (!line.isEmpty() && Character.isDigit(line.charAt(0))) out.add(LocalDate.parse(line.substring(0, line.indexOf(','))));
        }
        return new ArrayList<>(out);
    }

    private static byte[] send(String method, String path, String type, byte[] body, int expected) throws IOException, InterruptedException {
        HttpRequest.Builder b = HttpRequest.newBuilder(URI.create(base + path)).timeout(Duration.ofMinutes(10));
        if (body == null) b.method(method, HttpRequest.BodyPublishers.noBody());
        else b.method(method, HttpRequest.BodyPublishers.ofByteArray(body)).header("Content-Type", type);
        HttpResponse<byte[]> r = HTTP.send(b.build(), HttpResponse.BodyHandlers.ofByteArray());
        if (r.statusCode() != expected) {
            throw new IllegalStateException(method + " " + path + " answered " + r.statusCode() + ": " + new String(r.body(), java.nio.charset.StandardCharsets.UTF_8));
        }
        return r.body();
    }

    private static long processCpuNanos() {
        return ((com.sun.management.OperatingSystemMXBean) ManagementFactory.getOperatingSystemMXBean()).getProcessCpuTime();
    }

    private static String loadAverage() {
        try {
            return Files.readString(Path.of("/proc/loadavg")).trim();
        } catch (IOException e) {
            return String.format(Locale.ROOT, "%.2f", ManagementFactory.getOperatingSystemMXBean().getSystemLoadAverage());
        }
    }

    private static void deleteTree(Path p) throws IOException {
        if (!Files.exists(p)) return;
        try (var walk = Files.walk(p)) {
            for (Path q : walk.sorted(java.util.Comparator.reverseOrder()).toList()) Files.delete(q);
        }
    }
}
