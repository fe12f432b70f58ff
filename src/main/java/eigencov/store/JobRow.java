package eigencov.store;

import java.time.Instant;
import java.util.List;

/**
 * One stored job (table {@code job}): long work that runs in the background on exactly one instance
 * and survives restarts (docs/design.md section 6, "Jobs").
 *
 * @param requestJson the validated request, as JSON
 * @param resultJson  what the job has produced so far, as JSON (null in lists, which do not read it)
 * @param etaAt       when the instance running it last expected it to end; null before an estimate
 */
public record JobRow(long id, String kind, String state, String requestJson, String resultJson, int done, int total,
                     Instant createdAt, Instant startedAt, Instant finishedAt, Instant etaAt, String error) {
    public static final String QUEUED = "queued";
    public static final String RUNNING = "running";
    public static final String DONE = "done";
    public static final String FAILED = "failed";
    public static final String CANCELLED = "cancelled";
    /** Every state, in the order of a job's life. */
    public static final List<String> STATES = List.of(QUEUED, RUNNING, DONE, FAILED, CANCELLED);

    /** Done, failed or cancelled: nothing will change it any more. */
    public boolean finished() {
        return !QUEUED.equals(state) && !RUNNING.equals(state);
    }
}
