package eigencov.service;

import eigencov.store.FitRepository;
import eigencov.store.ModelRepository;
import eigencov.store.ModelRow;
import eigencov.store.RefitLocks;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.time.LocalDate;
import java.util.Optional;
import java.util.concurrent.ScheduledExecutorService;
import java.util.concurrent.TimeUnit;

/**
 * Runs each model's scheduled refits ({@code refit.every}) and the fits that follow an ingest
 * ({@code refitOnIngest}) in the background, on the injected executor, by the injected clock.
 *
 * <p>Every tick (fixed delay, so runs never overlap) looks at each model with a refit period: it is
 * due when no fit was ever attempted, or when {@code now >= last + every}, where {@code last} is the
 * start of the model's last fit attempt in the store. So after a restart a missed run is made once
 * (then {@code last = now}), not once per missed period. Of several instances sharing one database
 * exactly one runs a due refit: it holds the model's {@link RefitLocks} claim for the length of the
 * run and checks again under the claim that the run is still due. A claim dies with its holder, and
 * a fit is stored in one transaction, so when an instance dies mid-refit nothing half-stored
 * remains and the next check on any instance (within one tick) runs the refit. The start of each
 * scheduled run is also recorded ({@link ModelRepository#claimRefit}). A failed run is recorded in
 * the fit history by {@link FitService}; the served fit stays.
 */
public final class RefitScheduler implements IngestListener {
    private static final Logger LOG = LoggerFactory.getLogger(RefitScheduler.class);
    /** How often the schedule is checked; refit periods are at least a minute (ModelSpec.MIN_REFIT_PERIOD). */
    public static final Duration DEFAULT_TICK = Duration.ofSeconds(20);

    private final ModelRepository models;
    private final FitRepository fits;
    private final RefitLocks locks;
    private final FitService fitService;
    private final ServiceMetrics metrics;
    private final ScheduledExecutorService executor;
    private final Clock clock;
    private final Duration tick;

    public RefitScheduler(ModelRepository models, FitRepository fits, RefitLocks locks, FitService fitService, ServiceMetrics metrics,
                          ScheduledExecutorService executor, Clock clock, Duration tick) {
        if (tick.isNegative() || tick.isZero()) throw new IllegalArgumentException("tick must be positive, was " + tick);
        this.models = models;
        this.fits = fits;
        this.locks = locks;
        this.fitService = fitService;
        this.metrics = metrics;
        this.executor = executor;
        this.clock = clock;
        this.tick = tick;
    }

    /** Schedules the checks: first after one tick, then one tick after each check ends. */
    public void start() {
        executor.scheduleWithFixedDelay(this::runDueRefitsSafely, tick.toMillis(), tick.toMillis(), TimeUnit.MILLISECONDS);
    }

    /**
     * Runs every refit that is due now and that this instance claims.
     *
     * @return how many refits were run (ok or failed)
     */
    public int runDueRefits() {
        int runs = 0;
        for (ModelRow m : models.list()) {
            if (Thread.currentThread().isInterrupted()) break;
            if (m.refitEverySeconds() == null || !isDue(m, ModelService.now(clock))) continue;
            Optional<RefitLocks.Claim> claim = locks.tryClaim(m.id());
            metrics.refitClaim(m.name(), claim.isPresent());
            if (claim.isEmpty()) continue;
            try (RefitLocks.Claim held = claim.get()) {
                // Checked again under the claim: another instance may have finished this run a moment ago.
                Optional<ModelRow> fresh = models.find(m.name());
                Instant now = ModelService.now(clock);
                if (fresh.isEmpty() || fresh.get().id() != m.id() || !isDue(fresh.get(), now)) continue;
                if (!models.claimRefit(m.id(), fresh.get().lastRefitAt(), now)) continue;
                runs++;
                runFit(m.name(), FitService.SCHEDULE);
            }
        }
        return runs;
    }

    /**
     * Due when the model was never fitted, or its last attempt (ok or failed, any origin) started a
     * period or more ago. Only attempts count, not claims: a run whose instance died before storing
     * anything left no attempt, so the next check on any instance runs it.
     */
    private boolean isDue(ModelRow m, Instant now) {
        Instant last = fits.lastAttemptAt(m.id()).orElse(null);
        return last == null || !now.isBefore(last.plusSeconds(m.refitEverySeconds()));
    }

    /** Ingest hook: when the panel gained a new last date, fits each model on it that asks for it, in the background. */
    @Override
    public void afterIngest(String panel, LocalDate lastDateBefore, LocalDate lastDateAfter) {
        if (lastDateAfter == null || (lastDateBefore != null && !lastDateAfter.isAfter(lastDateBefore))) return;
        try {
            executor.execute(() -> {
                for (ModelRow m : models.list()) {
                    if (m.refitOnIngest() && m.panel().equals(panel)) runFit(m.name(), FitService.INGEST);
                }
            });
        } catch (RuntimeException e) {
            LOG.error("cannot queue the fits that follow an ingest into panel {}", panel, e);
        }
    }

    private void runDueRefitsSafely() {
        try {
            runDueRefits();
        } catch (Exception e) {
            LOG.error("refit schedule check failed; will try again in {}", tick, e);
        }
    }

    private void runFit(String model, String origin) {
        try {
            fitService.fit(model, null, origin);
        } catch (FitFailedException e) {
            LOG.warn("{} fit of model {} failed (recorded as fit {}): {}", origin, model, e.fitId(), e.getMessage());
        } catch (NotFoundException e) {
            LOG.info("{} fit of model {} skipped: the model was deleted", origin, model);
        } catch (Exception e) {
            if (e instanceof InterruptedException || e.getCause() instanceof InterruptedException) Thread.currentThread().interrupt();
            LOG.error("{} fit of model {} failed; the served fit stays", origin, model, e);
        }
    }
}
