package eigencov.service;

/**
 * Thrown out of a running job when it must stop before its end: it was cancelled (its stored state is
 * no longer running), or this process is stopping (the thread was interrupted; the job stays running in
 * the store and is resumed later, here or on another instance).
 */
public final class JobStoppedException extends RuntimeException {
    private final boolean cancelled;

    JobStoppedException(String message, boolean cancelled) {
        super(message);
        this.cancelled = cancelled;
    }

    /** True when the job was cancelled; false when the process is stopping. */
    public boolean cancelled() {
        return cancelled;
    }
}
