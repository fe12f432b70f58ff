package eigencov.http;

import com.fasterxml.jackson.annotation.JsonInclude;

/**
 * One validation failure inside a problem+json body: where (1-based data row of the request body,
 * field or parameter name) and what was wrong.
 */
@JsonInclude(JsonInclude.Include.NON_NULL)
public record FieldError(Long row, String field, String message) {
    public FieldError {
        if (message == null || message.isBlank()) throw new IllegalArgumentException("message required");
    }

    public static FieldError field(String field, String message) {
        return new FieldError(null, field, message);
    }

    public static FieldError at(long row, String field, String message) {
        return new FieldError(row, field, message);
    }
}
