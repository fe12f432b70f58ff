package eigencov.service;

/** The request conflicts with the current state, e.g. deleting a panel that models use (HTTP 409). */
public class ConflictException extends RuntimeException {
    public ConflictException(String message) {
        super(message);
    }
}
