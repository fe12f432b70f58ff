package eigencov.service;

import eigencov.store.JobRow;

import java.util.Map;

/**
 * A kind of stored job (docs/design.md section 6, "Jobs"): {@code backfill}, {@code evaluation}. The kind
 * validates and plans its requests when they arrive (nothing is stored for a rejected one), and
 * {@link #run} does or resumes the work on the instance that holds the job's claim.
 *
 * <p>A kind must be resumable: {@link #run} may be called again for a job that an earlier run (on
 * this or another instance) left half done, and it must then find what that run stored instead of
 * making it again. Work is stored in units that commit on their own (a fit); after each unit the
 * kind calls {@link JobContext#progress}, which stops it (by throwing) when the job was cancelled.
 */
public interface JobKind {
    /** The API name, stored in {@code job.kind}. */
    String name();

    /**
     * Runs the job from where its stored state says it stopped.
     *
     * @return the final result JSON (stored with the job as done)
     * @throws JobStoppedException from {@link JobContext#progress} when the job was cancelled or the process stops
     * @throws RuntimeException    anything else ends the job as failed, with the message as its error
     */
    String run(JobRow job, JobContext context);

    /** Links of a job of this kind beyond {@code self}, e.g. {@code {"model": "/v1/models/m"}}. */
    Map<String, String> links(JobRow job);

    /** Fields of a job of this kind beyond the common ones, from its stored row (result included); may be empty. */
    Map<String, Object> details(JobRow job);
}
