package eigencov.service;

import com.fasterxml.jackson.annotation.JsonAnyGetter;
import com.fasterxml.jackson.annotation.JsonIgnore;
import com.fasterxml.jackson.annotation.JsonInclude;
import com.fasterxml.jackson.annotation.JsonPropertyOrder;
import com.fasterxml.jackson.annotation.JsonRawValue;

import java.time.Instant;
import java.util.Map;

/**
 * A job as the API shows it (docs/design.md section 6): {@code id, kind, state, progress, createdAt,
 * startedAt?, finishedAt?, error?, links}, the request it runs, and the fields of its kind (a range
 * backfill: {@code model, fits, skipped, failed}).
 */
@JsonInclude(JsonInclude.Include.NON_NULL)
@JsonPropertyOrder({"id", "kind", "state", "progress", "createdAt", "startedAt", "finishedAt", "error", "request", "links"})
public record JobView(long id, String kind, String state, Progress progress, Instant createdAt, Instant startedAt, Instant finishedAt,
                      String error, @JsonRawValue String request, Map<String, String> links, @JsonIgnore Map<String, Object> details) {

    /** {@code done} of {@code total} steps; {@code etaSeconds} null until there is an estimate (0 once done). */
    @JsonInclude(JsonInclude.Include.ALWAYS)
    public record Progress(int done, int total, Long etaSeconds) {
    }

    @JsonAnyGetter
    public Map<String, Object> kindFields() {
        return details;
    }
}
