package eigencov.service;

import java.util.List;

/**
 * Input that a service rejects (HTTP 400, or 422 when {@link #unprocessable()}), with each problem
 * located by row (1-based data row of the request body) and/or field.
 */
public class InvalidInputException extends RuntimeException {
    /** One located problem. row and field may each be null. */
    public record Issue(Long row, String field, String message) {
    }

    private final List<Issue> issues;
    private final boolean unprocessable;
    private final String type;

    public InvalidInputException(String detail, List<Issue> issues) {
        this(detail, issues, false, "validation");
    }

    public InvalidInputException(String detail, List<Issue> issues, boolean unprocessable, String type) {
        super(detail);
        this.issues = List.copyOf(issues);
        this.unprocessable = unprocessable;
        this.type = type;
    }

    public static InvalidInputException field(String field, String message) {
        return new InvalidInputException(field + ": " + message, List.of(new Issue(null, field, message)));
    }

    public List<Issue> issues() { return issues; }
    public boolean unprocessable() { return unprocessable; }
    /** problem type slug, e.g. "validation", "unknown-tickers". */
    public String type() { return type; }
}
