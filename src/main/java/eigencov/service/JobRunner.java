package eigencov.service;

import eigencov.store.JobRepository;
import eigencov.store.JobRow;
import eigencov.store.RefitLocks;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

import java.sql.SQLTransientConnectionException;
import java.time.Clock;
import java.time.Duration;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.concurrent.ScheduledExecutorService;
import java.util.concurrent.TimeUnit;

/**
 * Runs stored jobs in the background (docs/design.md section 6, "Jobs"). Every {@code poll} (and at once
 * when a job is submitted here) it looks for queued and running jobs, oldest first, and runs each whose
 * claim it wins: {@link RefitLocks#forJobs}, a PostgreSQL session lock held for the whole run that dies
 * with its holder (on H2, one process per store, an in-process lock). So of several instances sharing
 * a store exactly one runs a job at a time; a job whose instance stopped (or died) is still "running"
 * in the store with nobody holding its claim, and the next look on any instance resumes it.
 *
 * <p>One job at a time per instance (one thread); a fit inside it still uses the fitter's pool. Without
 * an executor nothing runs in the background: the owner runs jobs itself ({@link #run}, {@link #runPending}).
 */
public final class JobRunner {
    private static final Logger LOG = LoggerFactory.getLogger(JobRunner.class);
    /** How often an instance looks for jobs to run or resume. */
    public static final Duration DEFAULT_POLL = Duration.ofSeconds(2);

    /** Told after every step of a job (tests use it to stop a run at a chosen point). */
    public interface Observer {
        Observer NONE = (id, done, total) -> { };

        void stepped(long jobId, int done, int total);
    }

    private final JobRepository jobs;
    private final RefitLocks claims;
    private final Map<String, JobKind> kinds = new LinkedHashMap<>();
    private final ScheduledExecutorService executor;
    private final Clock clock;
    private final Duration poll;
    private final Observer observer;
    private final Object finished = new Object();

    /** @param executor the job thread, or null: jobs run only when the owner calls {@link #run} or {@link #runPending} */
    public JobRunner(JobRepository jobs, RefitLocks claims, List<JobKind> kinds, ScheduledExecutorService executor, Clock clock,
                     Duration poll, Observer observer) {
        if (poll.isNegative() || poll.isZero()) throw new IllegalArgumentException("poll must be positive, was " + poll);
        this.jobs = jobs;
        this.claims = claims;
        for (JobKind k : kinds) this.kinds.put(k.name(), k);
        this.executor = executor;
        this.clock = clock;
        this.poll = poll;
        this.observer = observer;
    }

    /** The kinds this runner runs, by name. */
    public Map<String, JobKind> kinds() {
        return java.util.Collections.unmodifiableMap(kinds);
    }

    /** Looks for jobs every {@code poll}, the first time at once (jobs a stopped process left behind). */
    public void start() {
        if (executor == null) return;
        executor.scheduleWithFixedDelay(this::runPendingSafely, 0, poll.toMillis(), TimeUnit.MILLISECONDS);
    }

    /** Looks for jobs now, in the background (after a job was submitted). */
    public void wake() {
        if (executor == null) return;
        try {
            executor.execute(this::runPendingSafely);
        } catch (RuntimeException e) {
            LOG.warn("cannot look for jobs now ({}); the next poll will", e.getMessage());
        }
    }

    /**
     * Runs (to its end) every unfinished job this instance can claim, oldest first.
     *
     * @return how many runs were made
     */
    public int runPending() {
        int runs = 0;
        for (long id : jobs.unfinished()) {
            if (Thread.currentThread().isInterrupted()) break;
            if (run(id)) runs++;
        }
        return runs;
    }

    /**
     * Runs or resumes job {@code id} on the calling thread if this instance wins its claim.
     *
     * @return false when another holder has it, or it is finished or unknown
     */
    public boolean run(long id) {
        Optional<RefitLocks.Claim> claim = claims.tryClaim(id);
        if (claim.isEmpty()) return false;
        try (RefitLocks.Claim held = claim.get()) {
            // Read again under the claim: another instance may have finished it a moment ago.
            JobRow job = jobs.find(id).orElse(null);
            if (job == null || job.finished()) return false;
            JobKind kind = kinds.get(job.kind());
            if (kind == null) {
                LOG.error("job {} has kind '{}', which this version does not run", id, job.kind());
                return false;
            }
            if (!jobs.start(id, ModelService.now(clock))) return false;
            runClaimed(jobs.find(id).orElseThrow(), kind);
            return true;
        } finally {
            synchronized (finished) {
                finished.notifyAll();
            }
        }
    }

    private void runClaimed(JobRow job, JobKind kind) {
        JobContext ctx = new JobContext(jobs, job, clock, observer);
        if (job.done() > 0) LOG.info("job {} ({}) resumed at {}/{}", job.id(), job.kind(), job.done(), job.total());
        else LOG.info("job {} ({}) started: {} steps", job.id(), job.kind(), job.total());
        String result;
        try {
            result = kind.run(job, ctx);
        } catch (JobStoppedException e) {
            LOG.info("job {} ({}) stopped at {}/{}: {}", job.id(), job.kind(), ctx.done(), job.total(), e.getMessage());
            return;
        } catch (RuntimeException e) {
            if (Thread.currentThread().isInterrupted() || storeUnreachable(e)) {
                LOG.warn("job {} ({}) stopped at {}/{} and will be resumed: {}", job.id(), job.kind(), ctx.done(), job.total(), e.toString());
                return;
            }
            LOG.error("job {} ({}) failed at {}/{}", job.id(), job.kind(), ctx.done(), job.total(), e);
            jobs.finish(job.id(), JobRow.FAILED, null, e.getMessage() == null ? e.toString() : e.getMessage(), ModelService.now(clock));
            return;
        }
        if (jobs.finish(job.id(), JobRow.DONE, result, null, ModelService.now(clock))) {
            LOG.info("job {} ({}) done: {} steps in {} ms", job.id(), job.kind(), job.total(), ctx.elapsedMs());
        } else {
            LOG.info("job {} ({}) was cancelled as it ended; its result is not kept", job.id(), job.kind());
        }
    }

    /**
     * Waits until job {@code id} is finished (done, failed or cancelled), by whichever instance runs it.
     *
     * @return the finished job, or empty when it is unknown or still unfinished after {@code timeout}
     */
    public Optional<JobRow> awaitFinished(long id, Duration timeout) throws InterruptedException {
        long end = System.nanoTime() + timeout.toNanos();
        while (true) {
            Optional<JobRow> job = jobs.find(id);
            if (job.isEmpty() || job.get().finished()) return job.filter(JobRow::finished);
            long left = end - System.nanoTime();
            if (left <= 0) return Optional.empty();
            synchronized (finished) {
                // woken when a run here ends; runs elsewhere are seen by looking again
                finished.wait(Math.max(1, Math.min(TimeUnit.NANOSECONDS.toMillis(left), 100)));
            }
        }
    }

    private void runPendingSafely() {
        try {
            runPending();
        } catch (Exception e) {
            LOG.warn("looking for jobs failed; will look again in {}: {}", poll, e.getMessage());
        }
    }

    /** The store is gone (pool timeout, connection lost): not the job's fault; it is resumed later. */
    private static boolean storeUnreachable(Throwable e) {
        for (Throwable t = e; t != null; t = t.getCause()) {
            if (t instanceof UnavailableException || t instanceof SQLTransientConnectionException) return true;
            if (t instanceof java.sql.SQLException s && s.getSQLState() != null && s.getSQLState().startsWith("08")) return true;
            if (t.getCause() == t) break;
        }
        return false;
    }
}
