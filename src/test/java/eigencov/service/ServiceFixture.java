package eigencov.service;

import com.fasterxml.jackson.databind.ObjectMapper;
import eigencov.app.AppConfig;
import eigencov.http.HttpApi;
import eigencov.math.FactorFitter;
import eigencov.store.Database;
import eigencov.store.FitRepository;
import eigencov.store.JobRepository;
import eigencov.store.ModelRepository;
import eigencov.store.PanelStore;
import eigencov.store.RefitLocks;

import java.io.ByteArrayInputStream;
import java.nio.charset.StandardCharsets;
import java.time.Clock;
import java.time.LocalDate;
import java.util.List;
import java.util.concurrent.atomic.AtomicReference;

/**
 * The services of one instance wired by hand over a test store, as App does. {@link #sameStore()}
 * gives a second fixture on the same store: a restarted process or another instance.
 */
final class ServiceFixture implements AutoCloseable {
    final Database db;
    final ObjectMapper mapper = HttpApi.objectMapper();
    final ModelRepository modelRepo;
    final FitRepository fitRepo;
    final PanelStore windows;
    final PanelService panels;
    final ServedFits served;
    final FitService fits;
    final ModelService models;
    final Clock clock;
    final RefitLocks refitLocks;
    final JobRepository jobRepo;
    final JobRunner runner;
    final JobService jobs;
    final BackfillService backfills;
    final EvaluationService evaluations;
    /** Told after every job step; tests set it to stop, cancel or hold a run at a chosen step. */
    final AtomicReference<JobRunner.Observer> observer = new AtomicReference<>(JobRunner.Observer.NONE);
    private final String url;

    /** A fixture on a fresh store (in-memory H2, or a fresh PostgreSQL schema on the PostgreSQL test run). */
    ServiceFixture(String dbName, Clock clock) {
        this(clock, AppConfig.forTest(dbName).dbUrl());
    }

    private ServiceFixture(Clock clock, String url) {
        this.url = url;
        this.db = Database.open(url, "", "", 4);
        this.refitLocks = new RefitLocks(db);
        this.clock = clock;
        modelRepo = new ModelRepository(db.dataSource());
        fitRepo = new FitRepository(db.dataSource());
        windows = new PanelStore(db);
        served = new ServedFits(fitRepo, modelRepo, new FitCodec(mapper));
        fits = new FitService(modelRepo, fitRepo, windows, served, new FitCodec(mapper), new FactorFitter(null), mapper, clock);
        models = new ModelService(modelRepo, fitRepo, windows, served, mapper, clock);
        panels = new PanelService(windows, 10, (panel, before, after) -> { });
        jobRepo = new JobRepository(db.dataSource());
        // no executor: the test runs jobs itself, on its own thread
        runner = new JobRunner(jobRepo, RefitLocks.forJobs(db), JobKinds.create(fits, fitRepo, modelRepo, windows, refitLocks, mapper, null),
                null, clock, JobRunner.DEFAULT_POLL, (id, done, total) -> observer.get().stepped(id, done, total));
        jobs = new JobService(jobRepo, runner, clock);
        backfills = new BackfillService(modelRepo, windows, jobs, mapper);
        evaluations = new EvaluationService(modelRepo, windows, jobs, mapper);
    }

    /** Another fixture on this fixture's store: a restarted process, or a second instance. */
    ServiceFixture sameStore() {
        return new ServiceFixture(clock, url);
    }

    /** Upserts {@code rows} into {@code panel} through the ingest service, as an upload would. */
    void ingest(String panel, List<SyntheticReturns.Row> rows) {
        panels.ingest(panel, ReturnsFormat.CSV, new ByteArrayInputStream(SyntheticReturns.csv(rows).getBytes(StandardCharsets.UTF_8)));
    }

    /** Writes the synthetic panel {@code panel}: {@code tickers} names over {@code days} weekdays from 2024-01-01. */
    List<LocalDate> panel(String panel, int tickers, int days, long seed) {
        List<LocalDate> dates = SyntheticReturns.weekdays(LocalDate.of(2024, 1, 1), days);
        ingest(panel, SyntheticReturns.rows(seed, SyntheticReturns.tickers(tickers), dates));
        return dates;
    }

    /** A 2-factor covariance model of {@code windowDays}, optionally with a refit period. */
    static ModelSpec spec(String panel, int windowDays, String refitEvery, boolean refitOnIngest) {
        return new ModelSpec(panel, windowDays, new ModelSpec.Factors("fixed", 2, null, null), null, 0.9, "covariance", null,
                refitEvery == null ? null : new ModelSpec.Refit(refitEvery), refitOnIngest);
    }

    @Override
    public void close() {
        db.close();
    }
}
