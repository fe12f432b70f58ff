package eigencov.service;

import eigencov.math.FitResult;
import eigencov.math.ReturnPanel;
import eigencov.store.FitRepository;
import eigencov.store.ModelRepository;
import eigencov.store.ModelRow;
import eigencov.store.RefitLocks;

import java.time.Duration;
import java.time.LocalDate;
import java.util.List;
import java.util.Map;
import java.util.Optional;

/**
 * A model's fit at a date, as a job needs it: the stored one of the job's spec version if there is
 * one, else a new one made and stored for the job. Never twice: the check and the fit run under the
 * model's cluster-wide claim ({@link RefitLocks}, the one scheduled refits take), so two jobs (or a job
 * and a refit) on different instances cannot both make it, and a resumed job finds what it stored
 * before it stopped (fits carry the id of the job that made them, failed attempts too).
 */
final class JobFits {
    /** Longest wait for a model's claim (a scheduled refit of a large model, another job's fit). */
    static final Duration CLAIM_WAIT = Duration.ofMinutes(10);
    private static final long CLAIM_RETRY_MS = 50;

    enum Outcome { MADE, FOUND, FAILED }

    /**
     * @param byThisJob the fit or failure was recorded by the asking job (now, or in a run before it stopped)
     * @param result    the engine's result of a fit made now (null otherwise: read it from the store)
     * @param reason    why a fit failed
     */
    record Result(Outcome outcome, long fitId, boolean byThisJob, FitResult result, String reason) {
    }

    private final FitService fitService;
    private final FitRepository fits;
    private final ModelRepository models;
    private final RefitLocks modelClaims;

    JobFits(FitService fitService, FitRepository fits, ModelRepository models, RefitLocks modelClaims) {
        this.fitService = fitService;
        this.fits = fits;
        this.models = models;
        this.modelClaims = modelClaims;
    }

    /** What the stored attempts at one date say for a job: a usable fit, the job's own failure, or nothing (empty). */
    static Optional<Result> classify(List<FitRepository.Mark> marks, int specVersion, long jobId) {
        if (marks == null) return Optional.empty();
        FitRepository.Mark ok = null;
        FitRepository.Mark failed = null;
        for (FitRepository.Mark m : marks) {
            if (m.specVersion() != specVersion) continue;
            if (m.ok()) ok = m; // ascending ids: the last is the newest, the one asOf queries answer from
            else if (m.jobId() != null && m.jobId() == jobId) failed = m;
        }
        if (ok != null) return Optional.of(new Result(Outcome.FOUND, ok.fitId(), ok.jobId() != null && ok.jobId() == jobId, null, null));
        if (failed != null) return Optional.of(new Result(Outcome.FAILED, failed.fitId(), true, null, failed.reason()));
        return Optional.empty();
    }

    /**
     * The model's fit as of {@code asOf} for job {@code jobId}: found (any origin, same spec version),
     * the job's own earlier failure, or made now on a window cut from {@code all}.
     *
     * @throws IllegalStateException the model was deleted or its spec changed since the job was asked for
     */
    Result ensure(String model, int specVersion, LocalDate asOf, ReturnPanel all, long jobId, String origin) {
        try (RefitLocks.Claim held = claim(model)) {
            ModelRow m = current(model, specVersion);
            Map<LocalDate, List<FitRepository.Mark>> marks = fits.attemptsAt(m.id(), List.of(asOf));
            Optional<Result> known = classify(marks.get(asOf), specVersion, jobId);
            if (known.isPresent()) return known.get();
            ModelSpec spec = ModelService.readSpec(fitService.mapper(), m);
            try {
                FitService.Made made = fitService.fitForJob(m, spec, asOf, origin, all, jobId);
                return new Result(Outcome.MADE, made.row().id(), true, made.result(), null);
            } catch (FitFailedException e) {
                return new Result(Outcome.FAILED, e.fitId(), true, null, e.getMessage());
            }
        }
    }

    /** The model's row, checked to still have the job's spec version. */
    ModelRow current(String model, int specVersion) {
        ModelRow m = models.find(model).orElseThrow(() -> new IllegalStateException("model " + model + " was deleted while the job ran"));
        if (m.version() != specVersion) {
            throw new IllegalStateException("model " + model + "'s spec changed from version " + specVersion + " to " + m.version()
                    + " after the job was asked for; start a new one");
        }
        return m;
    }

    private RefitLocks.Claim claim(String model) {
        ModelRow m = models.find(model).orElseThrow(() -> new IllegalStateException("model " + model + " was deleted while the job ran"));
        long end = System.nanoTime() + CLAIM_WAIT.toNanos();
        while (true) {
            Optional<RefitLocks.Claim> c = modelClaims.tryClaim(m.id());
            if (c.isPresent()) return c.get();
            if (System.nanoTime() > end) {
                throw new IllegalStateException("model " + model + " was being fitted elsewhere for more than " + CLAIM_WAIT.toMinutes() + " minutes");
            }
            try {
                Thread.sleep(CLAIM_RETRY_MS);
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
                throw new JobStoppedException("stopped while waiting for the claim on model " + model, false);
            }
        }
    }
}
