package eigencov.service;

import eigencov.store.JobRepository;
import eigencov.store.JobRow;

import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/**
 * Stored jobs as the API sees them: submit (kinds call {@link #submit} once a request is valid),
 * list, read, cancel. Running them is {@link JobRunner}'s work.
 */
public final class JobService {
    /** Most jobs a list shows (newest first). */
    public static final int LIST_LIMIT = 1000;

    private final JobRepository jobs;
    private final JobRunner runner;
    private final Clock clock;

    public JobService(JobRepository jobs, JobRunner runner, Clock clock) {
        this.jobs = jobs;
        this.runner = runner;
        this.clock = clock;
    }

    /** Stores a valid, planned request as a queued job of {@code kind} and wakes the runner. */
    JobRow submit(String kind, String requestJson, String planJson, int total) {
        JobRow row = jobs.insert(kind, requestJson, planJson, total, ModelService.now(clock));
        runner.wake();
        return row;
    }

    /** Jobs newest first, of one kind or (null) all. */
    public List<JobView> list(String kind) {
        return rows(kind).stream().map(r -> view(r, false)).toList();
    }

    /** Stored jobs newest first (without their results), of one kind or (null) all. */
    List<JobRow> rows(String kind) {
        return jobs.list(kind, LIST_LIMIT);
    }

    public JobView get(long id) {
        return view(row(id), true);
    }

    /** The stored job; 404 when there is none. */
    JobRow row(long id) {
        return jobs.find(id).orElseThrow(() -> new NotFoundException("job", Long.toString(id)));
    }

    /** The stored job, or null. */
    JobRow rowOrNull(long id) {
        return jobs.find(id).orElse(null);
    }

    /**
     * Cancels a queued or running job: it stops after the step it is in, and what it stored stays.
     *
     * @throws NotFoundException no such job
     * @throws ConflictException the job is already finished
     */
    public JobView cancel(long id) {
        switch (jobs.cancel(id, ModelService.now(clock))) {
            case NOT_FOUND -> throw new NotFoundException("job", Long.toString(id));
            case FINISHED -> throw new ConflictException("job " + id + " is " + row(id).state() + "; only a queued or running job can be cancelled");
            default -> {
                return get(id);
            }
        }
    }

    /** The runner, for waiting on a job (demo loading, tests). */
    public JobRunner runner() {
        return runner;
    }

    JobView view(JobRow r, boolean withDetails) {
        JobKind kind = runner.kinds().get(r.kind());
        Map<String, String> links = new LinkedHashMap<>();
        links.put("self", "/v1/jobs/" + r.id());
        Map<String, Object> details = Map.of();
        if (kind != null) {
            links.putAll(kind.links(r));
            if (withDetails && r.resultJson() != null) details = kind.details(r);
        }
        return new JobView(r.id(), r.kind(), r.state(), progress(r), r.createdAt(), r.startedAt(), r.finishedAt(), r.error(),
                r.requestJson(), links, details);
    }

    JobView.Progress progress(JobRow r) {
        Long eta = null;
        if (JobRow.DONE.equals(r.state())) eta = 0L;
        else if (JobRow.RUNNING.equals(r.state()) && r.etaAt() != null) {
            eta = Math.max(0, (long) Math.ceil(Duration.between(Instant.now(clock), r.etaAt()).toMillis() / 1000.0));
        }
        return new JobView.Progress(r.done(), r.total(), eta);
    }
}
