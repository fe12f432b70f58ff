package eigencov.service;

import com.fasterxml.jackson.databind.ObjectMapper;
import eigencov.math.FactorFitter;
import eigencov.math.FitResult;
import eigencov.math.InsufficientDataException;
import eigencov.math.ReturnPanel;
import eigencov.store.FitRepository;
import eigencov.store.FitRow;
import eigencov.store.ModelRepository;
import eigencov.store.ModelRow;
import eigencov.store.PanelStore;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

import java.time.Clock;
import java.time.Instant;
import java.time.LocalDate;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.locks.ReentrantLock;
import java.util.function.Supplier;

/**
 * Fits models: load the window (point-in-time) -> fit, aligned to the previous fit -> store in one
 * transaction -> publish to {@link ServedFits}. A failed fit is recorded with its reason and the
 * served fit stays. Fits of one model run one at a time; queries never wait for them.
 */
public final class FitService {
    private static final Logger LOG = LoggerFactory.getLogger(FitService.class);

    /** What started a fit, as recorded in the fit history. */
    public static final String REQUEST = "request";
    public static final String BACKFILL = "backfill";
    public static final String SCHEDULE = "schedule";
    public static final String INGEST = "ingest";
    /** A fit an evaluation needed and did not find stored. */
    public static final String EVALUATION = "evaluation";

    private final ModelRepository models;
    private final FitRepository fits;
    private final PanelStore windows;
    private final ServedFits served;
    private final FitCodec codec;
    private final FactorFitter fitter;
    private final ObjectMapper mapper;
    private final Clock clock;
    private final ServiceMetrics metrics;
    private final ConcurrentHashMap<String, ReentrantLock> locks = new ConcurrentHashMap<>();

    public FitService(ModelRepository models, FitRepository fits, PanelStore windows, ServedFits served, FitCodec codec,
                      FactorFitter fitter, ObjectMapper mapper, Clock clock) {
        this(models, fits, windows, served, codec, fitter, mapper, clock, ServiceMetrics.NONE);
    }

    /** As above, reporting completed and failed fits to {@code metrics}. */
    public FitService(ModelRepository models, FitRepository fits, PanelStore windows, ServedFits served, FitCodec codec,
                      FactorFitter fitter, ObjectMapper mapper, Clock clock,
                      ServiceMetrics metrics) {
        this.models = models;
        this.fits = fits;
        this.windows = windows;
        this.served = served;
        this.codec = codec;
        this.fitter = fitter;
        this.mapper = mapper;
        this.clock = clock;
        this.metrics = metrics;
    }

    /**
     * Fits {@code model} as of {@code asOf} (null: today in the service clock's zone).
     *
     * @throws NotFoundException   no such model
     * @throws FitFailedException  the data cannot support the fit (recorded as a failed attempt)
     */
    public FitView fit(String model, LocalDate asOf, String origin) {
        ReentrantLock lock = locks.computeIfAbsent(model, k -> new ReentrantLock());
        lock.lock();
        try {
            ModelRow m = models.find(model).orElseThrow(() -> new NotFoundException("model", model));
            ModelSpec spec = ModelService.readSpec(mapper, m);
            LocalDate date = asOf == null ? LocalDate.now(clock) : asOf;
            return fitOne(m, spec, date, origin, () -> windows.loadWindow(spec.panel(), date, spec.windowDays()), null).view();
        } finally {
            lock.unlock();
        }
    }

    /**
     * Fits {@code model} as of each date (ascending), reading the panel once: each window is cut from
     * it on or before its own date, so no fit sees a later return. A date whose fit fails is recorded
     * and skipped.
     *
     * @return the attempts made, oldest first
     */
    public List<FitView> backfill(String model, List<LocalDate> asOfs) {
        ReentrantLock lock = locks.computeIfAbsent(model, k -> new ReentrantLock());
        lock.lock();
        try {
            ModelRow m = models.find(model).orElseThrow(() -> new NotFoundException("model", model));
            ModelSpec spec = ModelService.readSpec(mapper, m);
            List<LocalDate> dates = asOfs.stream().sorted().distinct().toList();
            List<FitView> out = new ArrayList<>();
            if (dates.isEmpty()) return out;
            ReturnPanel all = windows.loadWindow(spec.panel(), dates.get(dates.size() - 1), Integer.MAX_VALUE);
            for (LocalDate d : dates) {
                try {
                    out.add(fitOne(m, spec, d, BACKFILL, () -> Windows.cut(all, d, spec.windowDays()), null).view());
                } catch (FitFailedException e) {
                    out.add(get(model, e.fitId()));
                }
            }
            return out;
        } finally {
            lock.unlock();
        }
    }

    /** A stored fit and the engine's result it holds. */
    record Made(FitRow row, FitResult result) {
        FitView view() {
            return FitView.detail(row, result);
        }
    }

    /**
     * Fits {@code m} (the stored row, spec version included) as of {@code date} on a window cut from
     * {@code all}, for the job {@code jobId}: the same fit, alignment and publishing as
     * {@link #fit(String, LocalDate, String)}, recorded with the job that made it. Fits of one model
     * run one at a time in this process; across instances the caller holds the model's claim.
     *
     * @throws FitFailedException the data cannot support the fit (recorded as a failed attempt of the job)
     */
    Made fitForJob(ModelRow m, ModelSpec spec, LocalDate date, String origin, ReturnPanel all, long jobId) {
        ReentrantLock lock = locks.computeIfAbsent(m.name(), k -> new ReentrantLock());
        lock.lock();
        try {
            return fitOne(m, spec, date, origin, () -> Windows.cut(all, date, spec.windowDays()), jobId);
        } finally {
            lock.unlock();
        }
    }

    private Made fitOne(ModelRow m, ModelSpec spec, LocalDate date, String origin, Supplier<ReturnPanel> window, Long jobId) {
        Instant created = ModelService.now(clock);
        FitRepository.Attempt attempt = new FitRepository.Attempt(m.id(), origin, date, created, m.version(), m.specJson(), jobId);
        long t0 = System.nanoTime();
        Long loadMs = null;
        FitResult result;
        ReturnPanel w;
        try {
            w = window.get();
            loadMs = (System.nanoTime() - t0) / 1_000_000;
            if (w.rows() < spec.windowDays()) {
                throw new InsufficientDataException("panel '" + spec.panel() + "' has " + w.rows() + " dates on or before " + date
                        + "; the model's window needs " + spec.windowDays());
            }
            ServedFit previous = served.previousFor(m.name(), date);
            result = fitter.fit(w, spec.fitOptions(previous == null ? null : previous.result().factorCount()),
                    previous == null ? null : previous.result().model());
        } catch (InsufficientDataException | IllegalArgumentException e) {
            metrics.fitFailed(m.name(), e instanceof InsufficientDataException ? "insufficient-data" : "invalid-input");
            FitRow failed = fits.insertFailed(attempt, e.getMessage(), loadMs);
            LOG.warn("fit {} of model {} as of {} failed: {}", failed.id(), m.name(), date, e.getMessage());
            throw new FitFailedException(failed.id(), m.name(), e.getMessage());
        } catch (RuntimeException e) {
            if (Thread.currentThread().isInterrupted()) {
                // Stopped from outside (the process is shutting down), not a property of the data: a job
                // resumes this date later, and no failed attempt is recorded for it.
                throw e;
            }
            metrics.fitFailed(m.name(), "error");
            try {
                fits.insertFailed(attempt, e.getClass().getSimpleName() + ": " + e.getMessage(), loadMs);
            } catch (RuntimeException recordFailure) {
                e.addSuppressed(recordFailure);
            }
            throw e;
        }
        long computeMs = (System.nanoTime() - t0) / 1_000_000 - loadMs;
        List<LocalDate> used = result.dates();
        FitRow row = fits.insertOk(attempt, new FitRepository.Figures(result.model().factors(), result.model().size(), used.size(),
                used.get(0), used.get(used.size() - 1), loadMs, computeMs), codec.toData(result));
        served.publish(new ServedFit(new FitRef(row.id(), m.name(), date, row.createdAt()), result));
        metrics.fitCompleted(m.name(), (System.nanoTime() - t0) / 1_000_000);
        // a job's fits are many and the job logs its progress: one line each only at DEBUG
        if (jobId == null || LOG.isDebugEnabled()) {
            String line = "fit {} of model {} as of {}: k={} tickers={} dates={} load {} ms, compute {} ms, store {} ms";
            Object[] args = {row.id(), m.name(), date, row.factors(), row.tickers(), row.dates(), row.loadMs(), row.computeMs(), row.storeMs()};
            if (jobId == null) LOG.info(line, args);
            else LOG.debug(line, args);
        }
        return new Made(row, result);
    }

    /** The engine's result held by the stored ok fit {@code fitId}, read from the store (not the serving cache). */
    FitResult stored(long fitId) {
        return codec.toResult(fits.data(fitId).orElseThrow(() -> new IllegalStateException("fit " + fitId + " has no stored data")));
    }

    ObjectMapper mapper() {
        return mapper;
    }

    /** Every attempt of the model, newest first. */
    public List<FitView> list(String model) {
        if (models.find(model).isEmpty()) throw new NotFoundException("model", model);
        return fits.list(model).stream().map(FitView::brief).toList();
    }

    /** One attempt; an ok fit with universe, spectrum and diagnostics. */
    public FitView get(String model, long id) {
        FitRow row = fits.find(id).filter(r -> r.model().equals(model)).orElseThrow(() -> {
            if (models.find(model).isEmpty()) return new NotFoundException("model", model);
            return new NotFoundException("fit", id + " of model " + model);
        });
        if (!row.ok()) return FitView.brief(row);
        return FitView.detail(row, served.resolve(model, null, id).result());
    }
}
