package eigencov.load;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;

import java.io.IOException;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.time.DayOfWeek;
import java.time.Duration;
import java.time.LocalDate;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Random;
import java.util.Set;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.ConcurrentLinkedQueue;
import java.util.concurrent.atomic.AtomicInteger;
import java.util.concurrent.atomic.AtomicLong;

/**
 * Mixed load against several eigencov instances sharing one store (fault script
 * {@code scripts/fault-mixed-load}): query clients asking for covariance, ingest threads adding
 * new dates and correcting their own earlier rows, a refit thread, all spread over the instances,
 * for a bounded time. Afterwards it checks, against what it sent: no 5xx (no non-2xx at all), the
 * panel holds exactly the preloaded rows plus every distinct row sent with the last value sent,
 * and every fit named in an answer is a complete stored fit.
 *
 * <p>Usage: {@code MixedLoad PANEL MODEL TICKERS FIRST_NEW_DATE SECONDS QUERY_CLIENTS PRELOADED_ROWS URL...}.
 * Prints a summary on stdout; exit status 0 when every check passed.
 */
public final class MixedLoad {
    private static final Duration TIMEOUT = Duration.ofSeconds(30);
    private static final int QUERY_NAMES = 10;
    private static final int INGEST_THREADS = 2;

    private final String panel;
    private final String model;
    private final int tickers;
    private final List<String> urls;
    private final HttpClient client = HttpClient.newBuilder().connectTimeout(Duration.ofSeconds(5)).build();
    private final ObjectMapper json = new ObjectMapper();
    private final ConcurrentLinkedQueue<String> failures = new ConcurrentLinkedQueue<>();
    private final Set<Long> fitsSeen = ConcurrentHashMap.newKeySet();
    private final AtomicLong queries = new AtomicLong();
    private final AtomicLong ingests = new AtomicLong();
    private final AtomicLong refits = new AtomicLong();
    private final AtomicLong server5xx = new AtomicLong();
    private final ConcurrentLinkedQueue<Long> queryNanos = new ConcurrentLinkedQueue<>();
    /** Next new date to hand out, as an index of weekdays after FIRST_NEW_DATE. */
    private final AtomicInteger nextDate = new AtomicInteger();
    private final LocalDate firstNewDate;

    private MixedLoad(String panel, String model, int tickers, LocalDate firstNewDate, List<String> urls) {
        this.panel = panel;
        this.model = model;
        this.tickers = tickers;
        this.firstNewDate = firstNewDate;
        this.urls = List.copyOf(urls);
    }

    public static void main(String[] args) throws Exception {
        if (args.length < 8) {
            System.err.println("usage: MixedLoad PANEL MODEL TICKERS FIRST_NEW_DATE SECONDS QUERY_CLIENTS PRELOADED_ROWS URL...");
            System.exit(2);
        }
        MixedLoad load = new MixedLoad(args[0], args[1], Integer.parseInt(args[2]), LocalDate.parse(args[3]),
                Arrays.asList(args).subList(7, args.length));
        boolean ok = load.run(Duration.ofSeconds(Long.parseLong(args[4])), Integer.parseInt(args[5]), Long.parseLong(args[6]));
        System.exit(ok ? 0 : 1);
    }

    private boolean run(Duration length, int queryClients, long preloadedRows) throws Exception {
        long deadline = System.nanoTime() + length.toNanos();
        List<Thread> threads = new ArrayList<>();
        List<Map<String, Double>> sentByThread = new ArrayList<>();
        for (int i = 0; i < queryClients; i++) {
            int id = i;
            threads.add(new Thread(() -> queryLoop(id, deadline), "query-" + i));
        }
        for (int i = 0; i < INGEST_THREADS; i++) {
            Map<String, Double> sent = new HashMap<>();
            sentByThread.add(sent);
            int id = i;
            threads.add(new Thread(() -> ingestLoop(id, deadline, sent), "ingest-" + i));
        }
        threads.add(new Thread(() -> refitLoop(deadline), "refit"));
        threads.forEach(Thread::start);
        for (Thread t : threads) t.join(length.toMillis() + TIMEOUT.toMillis() * 3);
        for (Thread t : threads) if (t.isAlive()) failures.add("thread " + t.getName() + " still running after the deadline");

        Map<String, Double> expected = new HashMap<>();
        sentByThread.forEach(expected::putAll);
        checkRows(preloadedRows, expected);
        checkFits();

        long[] lat = queryNanos.stream().mapToLong(Long::longValue).sorted().toArray();
        System.out.printf(Locale.ROOT, "queries %d (p50 %.1f ms, p99 %.1f ms), ingests %d (%d distinct new rows), refits %d, 5xx %d, fits named %d%n",
                queries.get(), pct(lat, 0.50), pct(lat, 0.99), ingests.get(), expected.size(), refits.get(), server5xx.get(), fitsSeen.size());
        failures.stream().limit(20).forEach(f -> System.out.println("  failure: " + f));
        if (!failures.isEmpty()) System.out.println("  failures in all: " + failures.size());
        return failures.isEmpty();
    }

    private void queryLoop(int id, long deadline) {
        Random rnd = new Random(1_000 + id);
        int n = 0;
        while (System.nanoTime() < deadline) {
            String url = urls.get((id + n++) % urls.size());
            StringBuilder body = new StringBuilder("{\"tickers\":[");
            int[] picks = rnd.ints(0, tickers).distinct().limit(QUERY_NAMES).toArray();
            for (int i = 0; i < picks.length; i++) body.append(i == 0 ? "" : ",").append('"').append(ticker(picks[i])).append('"');
            body.append("]}");
            long t0 = System.nanoTime();
            JsonNode r = send(url, "POST", "/v1/models/" + model + "/covariance", "application/json", body.toString(), 200);
            queryNanos.add(System.nanoTime() - t0);
            queries.incrementAndGet();
            if (r == null) continue;
            JsonNode fit = r.path("fit");
            if (!fit.path("id").isNumber() || fit.path("model").asText("").isEmpty() || fit.path("asOf").isMissingNode()
                    || fit.path("createdAt").isMissingNode()) {
                failures.add("answer without a complete fit reference: " + fit);
                continue;
            }
            fitsSeen.add(fit.path("id").asLong());
            JsonNode m = r.path("matrix");
            if (m.size() != picks.length || m.path(0).size() != picks.length) failures.add("matrix not " + picks.length + " x " + picks.length);
        }
    }

    /** Each round adds one new date for every ticker and corrects one earlier date of this thread's own. */
    private void ingestLoop(int id, long deadline, Map<String, Double> sent) {
        Random rnd = new Random(2_000 + id);
        List<LocalDate> mine = new ArrayList<>();
        int n = 0;
        while (System.nanoTime() < deadline) {
            LocalDate date = weekday(nextDate.getAndIncrement());
            StringBuilder csv = new StringBuilder("date,ticker,value\n");
            Map<String, Double> batch = new HashMap<>();
            for (int t = 0; t < tickers; t++) addRow(csv, batch, date, t, rnd);
            if (!mine.isEmpty()) {
                LocalDate old = mine.get(rnd.nextInt(mine.size()));
                for (int t = 0; t < tickers; t += 7) addRow(csv, batch, old, t, rnd);
            }
            String url = urls.get((id + n++) % urls.size());
            JsonNode r = send(url, "POST", "/v1/panels/" + panel + "/returns", "text/csv", csv.toString(), 200);
            ingests.incrementAndGet();
            if (r != null) {
                sent.putAll(batch);
                mine.add(date);
            } else {
                // Unknown outcome: a later check would misjudge it, so the run fails on this alone.
                failures.add("ingest of " + date + " failed; its rows are not counted");
            }
        }
    }

    private void refitLoop(long deadline) {
        int n = 0;
        while (System.nanoTime() < deadline) {
            String url = urls.get(n++ % urls.size());
            JsonNode r = send(url, "POST", "/v1/models/" + model + "/fits", "application/json", "{}", 201);
            refits.incrementAndGet();
            if (r != null && r.path("id").isNumber()) fitsSeen.add(r.path("id").asLong());
            pause(Duration.ofSeconds(2), deadline);
        }
    }

    private void addRow(StringBuilder csv, Map<String, Double> batch, LocalDate date, int t, Random rnd) {
        double v = Math.round(rnd.nextGaussian() * 0.015 * 1e6) / 1e6;
        csv.append(date).append(',').append(ticker(t)).append(',').append(v).append('\n');
        batch.put(date + "," + ticker(t), v);
    }

    /** Every row sent is stored exactly once with the last value sent; nothing else was added. */
    private void checkRows(long preloadedRows, Map<String, Double> expected) {
        String url = urls.get(0);
        JsonNode summary = send(url, "GET", "/v1/panels/" + panel, null, null, 200);
        if (summary == null) return;
        long rows = summary.path("rows").asLong(-1);
        if (rows != preloadedRows + expected.size()) {
            failures.add("panel holds " + rows + " rows; sent " + preloadedRows + " preloaded + " + expected.size() + " distinct new");
        }
        String csv = sendText(url, "/v1/panels/" + panel + "/returns?from=" + firstNewDate);
        if (csv == null) return;
        Map<String, Double> stored = new HashMap<>();
        String[] lines = csv.split("\n");
        for (int i = 1; i < lines.length; i++) {
            String line = lines[i].strip();
            if (line.isEmpty()) continue;
            int last = line.lastIndexOf(',');
            if (stored.put(line.substring(0, last), Double.parseDouble(line.substring(last + 1))) != null) {
                failures.add("row read back twice: " + line);
            }
        }
        int lost = 0;
        int wrong = 0;
        for (Map.Entry<String, Double> e : expected.entrySet()) {
            Double v = stored.get(e.getKey());
            if (v == null) lost++;
            else if (Math.abs(v - e.getValue()) > 1e-12) wrong++;
        }
        int extra = stored.size() - (expected.size() - lost);
        if (lost > 0 || wrong > 0 || extra != 0) failures.add("rows: " + lost + " lost, " + wrong + " with a value not last sent, " + extra + " never sent");
    }

    /** Every fit an answer named is a stored, complete (ok) fit on every instance. */
    private void checkFits() {
        for (long id : fitsSeen) {
            for (String url : urls) {
                JsonNode f = send(url, "GET", "/v1/models/" + model + "/fits/" + id, null, null, 200);
                if (f != null && (f.path("k").asInt(0) < 1 || f.path("universe").size() != f.path("tickers").asInt(-1))) {
                    failures.add("fit " + id + " is incomplete on " + url + ": k " + f.path("k") + ", tickers " + f.path("tickers"));
                }
            }
        }
        if (fitsSeen.isEmpty()) failures.add("no answer named a fit");
    }

    private JsonNode send(String base, String method, String path, String contentType, String body, int expect) {
        HttpRequest.Builder b = HttpRequest.newBuilder(URI.create(base + path)).timeout(TIMEOUT).header("Accept", "application/json");
        if (body == null) b.method(method, HttpRequest.BodyPublishers.noBody());
        else b.header("Content-Type", contentType).method(method, HttpRequest.BodyPublishers.ofString(body));
        try {
            HttpResponse<String> r = client.send(b.build(), HttpResponse.BodyHandlers.ofString());
            if (r.statusCode() >= 500) server5xx.incrementAndGet();
            if (r.statusCode() != expect) {
                failures.add(method + " " + base + path + " -> " + r.statusCode() + ": " + abbreviate(r.body()));
                return null;
            }
            return json.readTree(r.body());
        } catch (IOException e) {
            failures.add(method + " " + base + path + " -> " + e);
            return null;
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            failures.add(method + " " + base + path + " interrupted");
            return null;
        }
    }

    private String sendText(String base, String path) {
        HttpRequest req = HttpRequest.newBuilder(URI.create(base + path)).timeout(TIMEOUT).header("Accept", "text/csv").GET().build();
        try {
            HttpResponse<String> r = client.send(req, HttpResponse.BodyHandlers.ofString());
            if (r.statusCode() == 200) return r.body();
            failures.add("GET " + path + " as CSV -> " + r.statusCode() + ": " + abbreviate(r.body()));
        } catch (IOException e) {
            failures.add("GET " + path + " as CSV -> " + e);
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
        return null;
    }

    private LocalDate weekday(int index) {
        LocalDate d = firstNewDate;
        int seen = -1;
        while (true) {
            if (d.getDayOfWeek() != DayOfWeek.SATURDAY && d.getDayOfWeek() != DayOfWeek.SUNDAY && ++seen == index) return d;
            d = d.plusDays(1);
        }
    }

    private static String ticker(int t) {
        return String.format(Locale.ROOT, "T%04d", t);
    }

    private static void pause(Duration d, long deadline) {
        long ms = Math.min(d.toMillis(), Math.max(0, (deadline - System.nanoTime()) / 1_000_000));
        try {
            Thread.sleep(ms);
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
    }

    private static double pct(long[] sorted, double p) {
        if (sorted.length == 0) return Double.NaN;
        return sorted[Math.min(sorted.length - 1, (int) Math.ceil(p * sorted.length) - 1)] / 1e6;
    }

    private static String abbreviate(String s) {
        return s == null ? "" : s.length() > 300 ? s.substring(0, 300) + "..." : s;
    }
}
