package eigencov.app;

import com.fasterxml.jackson.databind.ObjectMapper;
import eigencov.http.HttpApi;
import eigencov.http.MetricsRoutes;
import eigencov.http.RouteModule;
import eigencov.store.Database;
import io.javalin.Javalin;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

import java.util.ArrayList;
import java.util.List;

/**
 * The wiring of one eigencov process, by hand and in one place: store, repositories, services,
 * scheduler, HTTP. Tests create it with {@link AppConfig#forTest(String)} and start it on port 0.
 */
public final class App implements AutoCloseable {
    private static final Logger LOG = LoggerFactory.getLogger(App.class);

    private final AppConfig config;
    private final Database db;
    private final Metrics metrics;
    private final Javalin http;
    private boolean started;

    private App(AppConfig config, Database db, Metrics metrics, Javalin http) {
        this.config = config;
        this.db = db;
        this.metrics = metrics;
        this.http = http;
    }

    /** Builds everything (opening the store and migrating it) without starting the HTTP server. */
    public static App create(AppConfig config) {
        Metrics metrics = new Metrics();
        Database db;
        try {
            db = Database.open(config.dbUrl(), config.dbUser(), config.dbPassword(), config.dbPoolSize(), metrics.poolTracker());
        } catch (RuntimeException e) {
            metrics.close();
            throw e;
        }
        try {
            ObjectMapper mapper = HttpApi.objectMapper();
            List<RouteModule> modules = new ArrayList<>();
            modules.add(new MetricsRoutes(metrics::scrape, Metrics.CONTENT_TYPE));
            Javalin http = HttpApi.create(config.bindHost(), config.port(), config.maxBodyBytes(), config.shutdownGraceMs(),
                    mapper, db::isReachable, modules, metrics::httpRequest);
            return new App(config, db, metrics, http);
        } catch (RuntimeException e) {
            db.close();
            metrics.close();
            throw e;
        }
    }

    /** Starts serving; returns this for chaining. */
    public App start() {
        http.start();
        started = true;
        if (config.authDisabled()) {
            LOG.warn("NO API KEYS CONFIGURED: authentication is off, so the server listens on loopback ({}) only. "
                    + "Set EIGENCOV_API_KEYS to serve other hosts.", config.bindHost());
        }
        LOG.info("eigencov listening on {}:{}", config.bindHost(), http.port());
        return this;
    }

    /** The bound port (useful after starting on port 0). */
    public int port() {
        return http.port();
    }

    public AppConfig config() {
        return config;
    }

    public Database database() {
        return db;
    }

    public Metrics metrics() {
        return metrics;
    }

    /** Stops HTTP (letting in-flight requests finish within the grace period), then the store. */
    @Override
    public void close() {
        if (started) http.stop();
        db.close();
        metrics.close();
    }
}
