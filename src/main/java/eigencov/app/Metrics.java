package eigencov.app;

import com.zaxxer.hikari.metrics.MetricsTrackerFactory;
import com.zaxxer.hikari.metrics.micrometer.MicrometerMetricsTrackerFactory;
import eigencov.service.ServiceMetrics;
import eigencov.store.JobRepository;
import io.micrometer.core.instrument.Gauge;
import io.micrometer.core.instrument.Counter;
import io.micrometer.core.instrument.MeterRegistry;
import io.micrometer.core.instrument.Timer;
import io.micrometer.core.instrument.binder.jvm.ClassLoaderMetrics;
import io.micrometer.core.instrument.binder.jvm.JvmGcMetrics;
import io.micrometer.core.instrument.binder.jvm.JvmMemoryMetrics;
import io.micrometer.core.instrument.binder.jvm.JvmThreadMetrics;
import io.micrometer.core.instrument.binder.system.ProcessorMetrics;
import io.micrometer.core.instrument.binder.system.UptimeMetrics;
import io.micrometer.prometheusmetrics.PrometheusConfig;
import io.micrometer.prometheusmetrics.PrometheusMeterRegistry;

import java.time.Duration;
import java.util.Collection;
import java.util.HashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.function.Supplier;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.TimeUnit;

/**
 * What one eigencov process tells its operators on {@code GET /metrics} (Prometheus text format).
 * A small facade over one Micrometer registry per process (never the global one), so services call
 * {@code rowsIngested(..)} or {@code fitCompleted(..)} and never see meter names or tags.
 *
 * <p>Meters (Prometheus names):
 * <ul>
 * <li>{@code http_server_requests_seconds} histogram by {@code method}, {@code route} (the route
 *     template, {@code unmatched} for 404s without a route), {@code status}</li>
 * <li>{@code eigencov_rows_ingested_total} by {@code panel}</li>
 * <li>{@code eigencov_fit_duration_seconds} histogram by {@code model} (completed fits)</li>
 * <li>{@code eigencov_fit_failures_total} by {@code model}, {@code reason} (a short category)</li>
 * <li>{@code eigencov_refit_claims_total} by {@code model}, {@code outcome} ({@code won}: this instance
 *     runs the scheduled refit; {@code taken}: another instance holds it)</li>
 * <li>{@code eigencov_jobs} by {@code state}, {@code kind}: stored jobs of every instance, counted in the store</li>
 * <li>{@code hikaricp_connections_*} pool usage and acquire times (HikariCP's own tracker)</li>
 * <li>{@code jvm_*}, {@code process_*}, {@code system_*}: memory, GC, threads, classes, CPU, uptime</li>
 * </ul>
 * Tag values that come from users (panel and model names) are bounded by the names that exist.
 */
public final class Metrics implements ServiceMetrics, AutoCloseable {
    /** Prometheus text exposition format, version 0.0.4. */
    public static final String CONTENT_TYPE = "text/plain; version=0.0.4; charset=utf-8";

    /** Latency buckets for HTTP: 1 ms (a small covariance from memory) to 30 s (a 1,000,000-row ingest). */
    private static final Duration[] HTTP_BUCKETS = durations(1, 2, 5, 10, 25, 50, 100, 250, 500, 1_000, 2_500, 5_000, 10_000, 30_000);
    /** Fit buckets: 50 ms (a small demo model) to 10 min (a 3,000-name refit on a busy machine). */
    private static final Duration[] FIT_BUCKETS = durations(50, 100, 250, 500, 1_000, 2_500, 5_000, 10_000, 30_000, 60_000, 300_000, 600_000);

    private final PrometheusMeterRegistry registry;
    private final JvmGcMetrics gc;
    /**
     * The request timers by (method, route, status): the builder's lookup by name and sorted tags
     * was a noticeable part of the smallest requests. Bounded like the series themselves: routes
     * are templates (or "unmatched"), statuses few.
     */
    private final ConcurrentHashMap<HttpSeries, Timer> httpTimers = new ConcurrentHashMap<>();

    private record HttpSeries(String method, String route, int status) {
    }

    public Metrics() {
        this.registry = new PrometheusMeterRegistry(PrometheusConfig.DEFAULT);
        new JvmMemoryMetrics().bindTo(registry);
        new JvmThreadMetrics().bindTo(registry);
        new ClassLoaderMetrics().bindTo(registry);
        new ProcessorMetrics().bindTo(registry);
        new UptimeMetrics().bindTo(registry);
        this.gc = new JvmGcMetrics();
        gc.bindTo(registry);
    }

    /** The registry, for libraries that bring their own Micrometer binding. */
    public MeterRegistry registry() {
        return registry;
    }

    /** Everything in Prometheus text format ({@link #CONTENT_TYPE}). */
    public String scrape() {
        return registry.scrape();
    }

    /** HikariCP's pool meters, registered here once the pool starts. */
    public MetricsTrackerFactory poolTracker() {
        return new MicrometerMetricsTrackerFactory(registry);
    }

    /**
     * One finished HTTP request.
     *
     * @param route the route template ({@code /v1/models/{model}/covariance}), never the raw path
     */
    public void httpRequest(String method, String route, int status, long durationNanos) {
        httpTimers.computeIfAbsent(new HttpSeries(method, route, status), s -> Timer.builder("http.server.requests")
                        .description("HTTP requests by route template and status")
                        .tags("method", s.method(), "route", s.route(), "status", Integer.toString(s.status()))
                        .serviceLevelObjectives(HTTP_BUCKETS)
                        .register(registry))
                .record(durationNanos, TimeUnit.NANOSECONDS);
    }

    /** Rows stored by a committed ingest (inserted plus updated). */
    @Override
    public void rowsIngested(String panel, long rows) {
        if (rows < 0) throw new IllegalArgumentException("rows must not be negative, was " + rows);
        Counter.builder("eigencov.rows.ingested").description("return rows stored by committed ingests")
                .tag("panel", panel).register(registry).increment(rows);
    }

    /** A fit stored completely; {@code durationMs} from loading the window to the stored fit. */
    @Override
    public void fitCompleted(String model, long durationMs) {
        if (durationMs < 0) throw new IllegalArgumentException("durationMs must not be negative, was " + durationMs);
        Timer.builder("eigencov.fit.duration").description("completed fits, load to stored")
                .tag("model", model).serviceLevelObjectives(FIT_BUCKETS).register(registry)
                .record(durationMs, TimeUnit.MILLISECONDS);
    }

    /**
     * A fit that did not complete (the served fit stayed in place).
     *
     * @param reason a short category such as {@code store}, {@code too-few-dates}, {@code numeric};
     *               anything else is folded to {@code other} so the series stay few
     */
    @Override
    public void fitFailed(String model, String reason) {
        Counter.builder("eigencov.fit.failures").description("fits that failed, by reason category")
                .tags("model", model, "reason", category(reason)).register(registry).increment();
    }

    /** A scheduled refit that this instance did ({@code won}) or did not ({@code false}: another instance holds it) claim. */
    @Override
    public void refitClaim(String model, boolean won) {
        Counter.builder("eigencov.refit.claims").description("scheduled refit claims on the shared store")
                .tags("model", model, "outcome", won ? "won" : "taken").register(registry).increment();
    }

    /** The store is asked for job counts at most this often, however often /metrics is scraped. */
    static final Duration JOB_COUNTS_MAX_AGE = Duration.ofSeconds(1);

    /**
     * Gauges {@code eigencov_jobs{state, kind}} of the stored jobs, one per state and kind (so a series
     * exists at 0 before any job of it), read from {@code counts} when scraped (at most once a second).
     * A store that cannot be asked gives NaN.
     */
    public void jobCounts(Collection<String> states, Collection<String> kinds, Supplier<List<JobRepository.Count>> counts) {
        JobCounts snapshot = new JobCounts(counts);
        for (String state : states) {
            for (String kind : kinds) {
                Gauge.builder("eigencov.jobs", snapshot, s -> s.get(state, kind)).description("stored jobs by state and kind")
                        .tags("state", state, "kind", kind).strongReference(true).register(registry);
            }
        }
    }

    /** The last job counts read, re-read when older than {@link #JOB_COUNTS_MAX_AGE}. */
    private static final class JobCounts {
        private final Supplier<List<JobRepository.Count>> source;
        private Map<String, Long> counts = Map.of();
        private long readAt;
        private boolean failed;

        JobCounts(Supplier<List<JobRepository.Count>> source) {
            this.source = source;
        }

        synchronized double get(String state, String kind) {
            long now = System.nanoTime();
            if (readAt == 0 || now - readAt > JOB_COUNTS_MAX_AGE.toNanos()) {
                readAt = now;
                try {
                    Map<String, Long> m = new HashMap<>();
                    for (JobRepository.Count c : source.get()) m.put(c.state() + "/" + c.kind(), c.jobs());
                    counts = m;
                    failed = false;
                } catch (RuntimeException e) {
                    failed = true;
                }
            }
            return failed ? Double.NaN : counts.getOrDefault(state + "/" + kind, 0L);
        }
    }

    static String category(String reason) {
        if (reason == null) return "other";
        String r = reason.toLowerCase(Locale.ROOT);
        return r.matches("[a-z][a-z0-9_-]{0,31}") ? r : "other";
    }

    private static Duration[] durations(long... millis) {
        Duration[] out = new Duration[millis.length];
        for (int i = 0; i < millis.length; i++) out[i] = Duration.ofMillis(millis[i]);
        return out;
    }

    @Override
    public void close() {
        gc.close();
        registry.close();
    }
}
