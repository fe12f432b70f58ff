package eigencov.app;

import com.fasterxml.jackson.databind.ObjectMapper;
import eigencov.http.HttpApi;
import eigencov.http.QueryRoutes;
import eigencov.http.RouteModule;
import eigencov.service.FitLookup;
import eigencov.service.QueryService;
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
    private final Javalin http;
    private boolean started;

    private App(AppConfig config, Database db, Javalin http) {
        this.config = config;
        this.db = db;
        this.http = http;
    }

    /** Builds everything (opening the store and migrating it) without starting the HTTP server. */
    public static App create(AppConfig config) {
        return create(config, null);
    }

    /**
     * As {@link #create(AppConfig)}, and the query endpoints answer from {@code fits} (null: no
     * query endpoints). For callers that serve fits from elsewhere: tests and the query benchmark.
     */
    public static App create(AppConfig config, FitLookup fits) {
        Database db = Database.open(config.dbUrl(), config.dbUser(), config.dbPassword(), config.dbPoolSize());
        try {
            ObjectMapper mapper = HttpApi.objectMapper();
            List<RouteModule> modules = new ArrayList<>();
            if (fits != null) modules.add(new QueryRoutes(new QueryService(fits), mapper));
            Javalin http = HttpApi.create(config.bindHost(), config.port(), config.maxBodyBytes(), config.shutdownGraceMs(),
                    mapper, db::isReachable, modules);
            return new App(config, db, http);
        } catch (RuntimeException e) {
            db.close();
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

    /** Stops HTTP (letting in-flight requests finish within the grace period), then the store. */
    @Override
    public void close() {
        if (started) http.stop();
        db.close();
    }
}
