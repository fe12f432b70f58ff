package eigencov.math;

/** The window cannot support the requested fit (too few dates, empty universe, no variance). */
public final class InsufficientDataException extends RuntimeException {
    private static final long serialVersionUID = 1L;

    public InsufficientDataException(String message) {
        super(message);
    }
}
