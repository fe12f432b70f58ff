package eigencov.app;

import com.fasterxml.jackson.databind.ObjectMapper;
import eigencov.http.ApiKeys;
import eigencov.http.EvaluationRoutes;
import eigencov.http.HttpApi;
import eigencov.http.JobRoutes;
import eigencov.http.MetricsRoutes;
import eigencov.http.ModelRoutes;
import eigencov.http.PanelRoutes;
import eigencov.http.RouteModule;
import eigencov.math.FactorFitter;
import eigencov.math.Kernels;
import eigencov.service.BackfillService;
import eigencov.service.EvaluationService;
import eigencov.service.FitCodec;
import eigencov.service.FitLookup;
import eigencov.service.FitService;
import eigencov.service.IngestListener;
import eigencov.service.JobKinds;
import eigencov.service.JobRunner;
import eigencov.service.JobService;
import eigencov.service.ModelService;
import eigencov.service.PanelService;
import eigencov.service.RefitScheduler;
import eigencov.service.ServedFits;
import eigencov.http.QueryRoutes;
import eigencov.service.QueryService;
import eigencov.store.Database;
import eigencov.store.FitRepository;
import eigencov.store.JobRepository;
import eigencov.store.JobRow;
import eigencov.store.ModelRepository;
import eigencov.store.PanelStore;
import eigencov.store.RefitLocks;
import io.javalin.Javalin;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

import java.time.Clock;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.ScheduledExecutorService;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicInteger;

/**
 * The wiring of one eigencov process, by hand and in one place: store, repositories, services,
 * scheduler, HTTP. Tests create it with {@link AppConfig#forTest(String)} and start it on port 0.
 */
public final class App implements AutoCloseable {
    private static final Logger LOG = LoggerFactory.getLogger(App.class);

    /** How often this instance looks in the store for fits written by other instances. */
    static final long FIT_POLL_SECONDS = 5;

    private final AppConfig config;
    private final Database db;
    private final Metrics metrics;
    private final Javalin http;
    private final Fits fits;
    private boolean started;

    private App(AppConfig config, Database db, Metrics metrics, Javalin http, Fits fits) {
        this.config = config;
        this.db = db;
        this.metrics = metrics;
        this.http = http;
        this.fits = fits;
    }

    /**
     * The fit side of the wiring: serving snapshots, fitting, scheduling, jobs, their background threads,
     * the poller that picks up other instances' fits, and the pool the fitter splits its kernels over.
     */
    private record Fits(ServedFits served, RefitScheduler scheduler, JobService jobs, ScheduledExecutorService background,
                        ScheduledExecutorService jobThread, ScheduledExecutorService poller, ExecutorService kernels) {
    }

    /** Threads the fitter's kernels (Gram product, tridiagonalisation, EM products) are split over: the machine's 2 cores. */
    static final int FIT_THREADS = 2;

    /** Builds everything (opening the store and migrating it) without starting the HTTP server. */
    public static App create(AppConfig config) {
        return create(config, Clock.systemUTC(), null);
    }

    /** As {@link #create(AppConfig)}, with the clock fits and schedules are stamped by. */
    public static App create(AppConfig config, Clock clock) {
        return create(config, clock, null);
    }

    /**
     * As {@link #create(AppConfig)}, but the query endpoints answer from {@code queryFits} instead of
     * this process's own fits. For callers that serve fits from elsewhere: tests and the query benchmark.
     */
    public static App create(AppConfig config, FitLookup queryFits) {
        return create(config, Clock.systemUTC(), queryFits);
    }

    private static App create(AppConfig config, Clock clock, FitLookup queryFits) {
        Metrics metrics = new Metrics();
        Database db;
        try {
            db = Database.open(config.dbUrl(), config.dbUser(), config.dbPassword(), config.dbPoolSize(), metrics.poolTracker());
        } catch (RuntimeException e) {
            metrics.close();
            throw e;
        }
        ScheduledExecutorService background = null;
        ScheduledExecutorService jobThread = null;
        ExecutorService kernels = null;
        // Its own thread: refits can keep both background threads busy for minutes, and other
        // instances' fits must still be picked up within FIT_POLL_SECONDS.
        ScheduledExecutorService poller = Executors.newSingleThreadScheduledExecutor(daemonThreads("eigencov-fit-poll-"));
        try {
            ObjectMapper mapper = HttpApi.objectMapper();
            List<RouteModule> modules = new ArrayList<>();
            PanelStore panelStore = new PanelStore(db);
            ModelRepository modelRepo = new ModelRepository(db.dataSource());
            FitRepository fitRepo = new FitRepository(db.dataSource());
            ServedFits served = new ServedFits(fitRepo, modelRepo, new FitCodec(mapper));
            // one pool shared by every fit: the calling thread runs one part of each kernel and the pool the rest
            kernels = Executors.newFixedThreadPool(FIT_THREADS, daemonThreads("eigencov-fit-"));
            FitService fitService = new FitService(modelRepo, fitRepo, panelStore, served, new FitCodec(mapper), new FactorFitter(kernels), mapper, clock, metrics);
            ModelService modelService = new ModelService(modelRepo, fitRepo, panelStore, served, mapper, clock);
            background = Executors.newScheduledThreadPool(2, daemonThreads("eigencov-refit-"));
            // one claim registry per model for scheduled refits and jobs' fits alike (on H2 it is in-process)
            RefitLocks modelClaims = new RefitLocks(db);
            RefitScheduler scheduler = new RefitScheduler(modelRepo, fitRepo, modelClaims, fitService, metrics, background, clock,
                    RefitScheduler.DEFAULT_TICK);
            // jobs run one at a time on their own thread, so a long evaluation never holds up scheduled refits
            jobThread = Executors.newSingleThreadScheduledExecutor(daemonThreads("eigencov-job-"));
            JobRepository jobRepo = new JobRepository(db.dataSource());
            JobRunner runner = new JobRunner(jobRepo, RefitLocks.forJobs(db),
                    JobKinds.create(fitService, fitRepo, modelRepo, panelStore, modelClaims, mapper, kernels), jobThread, clock,
                    JobRunner.DEFAULT_POLL, JobRunner.Observer.NONE);
            JobService jobs = new JobService(jobRepo, runner, clock);
            metrics.jobCounts(JobRow.STATES, runner.kinds().keySet(), jobRepo::counts);
            BackfillService backfills = new BackfillService(modelRepo, panelStore, jobs, mapper);
            EvaluationService evaluations = new EvaluationService(modelRepo, panelStore, jobs, mapper);
            PanelService panels = new PanelService(panelStore, config.maxAbsReturn(), scheduler, metrics);
            modules.add(new PanelRoutes(panels, config.maxBodyBytes(), mapper.getFactory()));
            modules.add(new ModelRoutes(modelService, fitService, backfills));
            modules.add(new JobRoutes(jobs));
            modules.add(new EvaluationRoutes(evaluations, mapper));
            modules.add(new QueryRoutes(new QueryService(queryFits != null ? queryFits : served), mapper, config.maxBodyBytes()));
            modules.add(new MetricsRoutes(metrics::scrape, Metrics.CONTENT_TYPE));
            Javalin http = HttpApi.create(config.bindHost(), config.port(), config.maxBodyBytes(), config.shutdownGraceMs(),
                    config.slowRequestMs(), mapper, db::isReachable, ApiKeys.parse(config.apiKeys()), modules, metrics::httpRequest);
            if (config.demo()) new DemoLoader(config.demoDir(), panels, panelStore, modelService, backfills, evaluations, jobs, mapper).load();
            return new App(config, db, metrics, http, new Fits(served, scheduler, jobs, background, jobThread, poller, kernels));
        } catch (RuntimeException e) {
            if (background != null) background.shutdownNow();
            if (jobThread != null) jobThread.shutdownNow();
            if (kernels != null) kernels.shutdownNow();
            poller.shutdownNow();
            db.close();
            metrics.close();
            throw e;
        }
    }

    private static java.util.concurrent.ThreadFactory daemonThreads(String prefix) {
        AtomicInteger n = new AtomicInteger();
        return r -> {
            Thread t = new Thread(r, prefix + n.incrementAndGet());
            t.setDaemon(true);
            return t;
        };
    }

    /** Starts serving and the background refits; returns this for chaining. */
    public App start() {
        fits.scheduler().start();
        fits.jobs().runner().start();
        fits.poller().scheduleWithFixedDelay(this::pollFits, FIT_POLL_SECONDS, FIT_POLL_SECONDS, TimeUnit.SECONDS);
        http.start();
        started = true;
        if (config.authDisabled()) {
            LOG.warn("NO API KEYS CONFIGURED: authentication is off, so the server listens on loopback ({}) only. "
                    + "Set EIGENCOV_API_KEYS to serve other hosts.", config.bindHost());
        }
        LOG.info("eigencov listening on {}:{}; fits use {}", config.bindHost(), http.port(),
                Kernels.description());
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

    /** The fit every query uses (newest, by asOf, or by id). */
    public FitLookup fitLookup() {
        return fits.served();
    }

    /** Stored jobs (range backfills, evaluations): list, read, cancel, and wait for one. */
    public JobService jobs() {
        return fits.jobs();
    }

    /** For the ingest service: told after each committed batch, it starts the fits that follow an ingest. */
    public IngestListener ingestListener() {
        return fits.scheduler();
    }

    private void pollFits() {
        try {
            fits.served().refresh();
        } catch (Exception e) {
            LOG.warn("could not look for new fits in the store: {}", e.getMessage());
        }
    }

    /** Stops HTTP (letting in-flight requests finish within the grace period), then the store. */
    @Override
    public void close() {
        // first, so that a running job stops after its current step rather than going on while requests drain; it
        // stays "running" in the store and is resumed at the next start (or by another instance)
        fits.jobThread().shutdownNow();
        if (started) http.stop();
        fits.poller().shutdownNow();
        fits.background().shutdownNow();
        try {
            if (!fits.background().awaitTermination(config.shutdownGraceMs(), TimeUnit.MILLISECONDS)) {
                LOG.warn("background fits did not stop within {} ms", config.shutdownGraceMs());
            }
            if (!fits.jobThread().awaitTermination(config.shutdownGraceMs(), TimeUnit.MILLISECONDS)) {
                LOG.warn("the running job did not stop within {} ms; it is resumed at the next start", config.shutdownGraceMs());
            }
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
        // after the fits that use it have stopped
        fits.kernels().shutdownNow();
        db.close();
        metrics.close();
    }
}
