package eigencov.http;

import com.fasterxml.jackson.annotation.JsonInclude;

import java.util.List;

/**
 * RFC 9457 problem details body. {@code type} is a relative URI reference under {@code /problems/}.
 */
@JsonInclude(JsonInclude.Include.NON_NULL)
public record Problem(String type, String title, int status, String detail, String instance, List<FieldError> errors) {
    public static final String CONTENT_TYPE = "application/problem+json";

    public Problem {
        errors = errors == null ? List.of() : List.copyOf(errors);
    }

    public static Problem of(ApiException e, String instance) {
        return new Problem("/problems/" + e.type(), e.title(), e.status(), e.getMessage(), instance, e.errors());
    }
}
