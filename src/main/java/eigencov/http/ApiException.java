package eigencov.http;

import java.util.List;

/**
 * A request that cannot be served as asked. Mapped once, at the edge, to an RFC 9457
 * {@code application/problem+json} response with the given status, a stable problem {@code type}
 * slug, a short title, a detail sentence and (for validation failures) the list of field errors.
 */
public class ApiException extends RuntimeException {
    private final int status;
    private final String type;
    private final String title;
    private final List<FieldError> errors;

    public ApiException(int status, String type, String title, String detail, List<FieldError> errors) {
        super(detail);
        if (status < 400 || status > 599) throw new IllegalArgumentException("status must be 4xx or 5xx, was " + status);
        this.status = status;
        this.type = type;
        this.title = title;
        this.errors = errors == null ? List.of() : List.copyOf(errors);
    }

    public int status() { return status; }
    public String type() { return type; }
    public String title() { return title; }
    public List<FieldError> errors() { return errors; }

    /** 400: the request is malformed or a value is invalid. */
    public static ApiException badRequest(String detail, List<FieldError> errors) {
        return new ApiException(400, "validation", "Invalid request", detail, errors);
    }

    /** 400 naming a single field. */
    public static ApiException badField(String field, String message) {
        return badRequest(field + ": " + message, List.of(FieldError.field(field, message)));
    }

    /** 404: the named thing does not exist. */
    public static ApiException notFound(String what, String name) {
        return new ApiException(404, "not-found", what + " not found", what + " '" + name + "' does not exist", List.of());
    }

    /** 409: the request conflicts with the current state. */
    public static ApiException conflict(String detail) {
        return new ApiException(409, "conflict", "Conflict", detail, List.of());
    }

    /** 422: well-formed but cannot be processed (e.g. tickers unknown to the fit). */
    public static ApiException unprocessable(String type, String title, String detail, List<FieldError> errors) {
        return new ApiException(422, type, title, detail, errors);
    }
}
