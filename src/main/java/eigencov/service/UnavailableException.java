package eigencov.service;

/** A dependency (the store) is unreachable right now; the client may retry (HTTP 503). */
public class UnavailableException extends RuntimeException {
    public UnavailableException(String message, Throwable cause) {
        super(message, cause);
    }
}
