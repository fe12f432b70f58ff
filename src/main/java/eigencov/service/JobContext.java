package eigencov.service;

import eigencov.store.JobRepository;
import eigencov.store.JobRow;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

import java.time.Clock;
import java.time.Duration;
import java.time.Instant;

/**
 * One run of one job, as its {@link JobKind} sees it: it reports progress through {@link #progress},
 * which stores it (with an estimate of the end), logs a line every 10 % or 10 s, and stops the run
 * when the job was cancelled or the process is stopping.
 */
public final class JobContext {
    private static final Logger LOG = LoggerFactory.getLogger(JobContext.class);
    /** At least one progress line this often, even when 10 % takes longer. */
    static final Duration LOG_EVERY = Duration.ofSeconds(10);

    private final JobRepository jobs;
    private final JobRow job;
    private final Clock clock;
    private final JobRunner.Observer observer;
    private final long startNanos = System.nanoTime();
    private final int doneAtStart;
    private long lastLogNanos = startNanos;
    private int lastDecile;
    private int done;

    JobContext(JobRepository jobs, JobRow job, Clock clock, JobRunner.Observer observer) {
        this.jobs = jobs;
        this.job = job;
        this.clock = clock;
        this.observer = observer;
        this.doneAtStart = job.done();
        this.done = job.done();
        this.lastDecile = decile(job.done());
    }

    public long jobId() {
        return job.id();
    }

    /** Steps done when this run started (0 on a first run). */
    public int doneAtStart() {
        return doneAtStart;
    }

    /**
     * Stores that {@code done} of the job's steps are done, and the result so far.
     *
     * @param resultJson the result so far, or null to keep the stored one
     * @throws JobStoppedException when the job was cancelled, or this thread was interrupted (the process stops)
     */
    public void progress(int done, String resultJson) {
        if (Thread.currentThread().isInterrupted()) throw new JobStoppedException("job " + job.id() + " stopped: the process is stopping", false);
        this.done = done;
        long now = System.nanoTime();
        Long etaSeconds = eta(now);
        Instant etaAt = etaSeconds == null ? null : ModelService.now(clock).plusSeconds(etaSeconds);
        if (!jobs.progress(job.id(), done, resultJson, etaAt)) {
            throw new JobStoppedException("job " + job.id() + " is no longer running (cancelled)", true);
        }
        int decile = decile(done);
        if (decile > lastDecile || now - lastLogNanos >= LOG_EVERY.toNanos()) {
            lastDecile = Math.max(lastDecile, decile);
            lastLogNanos = now;
            LOG.info("job {} ({}): {}/{} ({} %){}", job.id(), job.kind(), done, job.total(), percent(done),
                    etaSeconds == null ? "" : ", about " + etaSeconds + " s left");
        }
        observer.stepped(job.id(), done, job.total());
    }

    /**
     * Stops the run before its next expensive step when the job was cancelled meanwhile (or the process
     * is stopping), so that what the job lists as done is all it stored.
     *
     * @throws JobStoppedException as {@link #progress}
     */
    public void checkRunning() {
        if (Thread.currentThread().isInterrupted()) throw new JobStoppedException("job " + job.id() + " stopped: the process is stopping", false);
        if (!JobRow.RUNNING.equals(jobs.state(job.id()).orElse(null))) {
            throw new JobStoppedException("job " + job.id() + " is no longer running (cancelled)", true);
        }
    }

    /** Seconds left at this run's pace, or null before this run has done a step. */
    private Long eta(long now) {
        int steps = done - doneAtStart;
        if (steps <= 0 || done >= job.total()) return done >= job.total() ? 0L : null;
        double perStep = (now - startNanos) / 1e9 / steps;
        return (long) Math.ceil(perStep * (job.total() - done));
    }

    private int decile(int d) {
        return job.total() == 0 ? 10 : (int) (10L * d / job.total());
    }

    private long percent(int d) {
        return job.total() == 0 ? 100 : 100L * d / job.total();
    }

    /** Milliseconds since this run started. */
    long elapsedMs() {
        return (System.nanoTime() - startNanos) / 1_000_000;
    }

    int done() {
        return done;
    }
}
