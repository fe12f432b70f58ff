package eigencov.service;

import com.fasterxml.jackson.annotation.JsonInclude;
import com.fasterxml.jackson.annotation.JsonPropertyOrder;
import com.fasterxml.jackson.databind.JsonNode;

import java.time.Instant;
import java.util.Map;

/**
 * An evaluation as the API shows it (docs/design.md section 6): its job's state and progress, the request,
 * the forecast dates used and those dropped (with reasons), and one result per model and per (model,
 * baseline). Lists leave out dates, dropped and results. Until it is done, {@code dates} and
 * {@code dropped} are the plan and {@code results} is empty.
 */
@JsonInclude(JsonInclude.Include.NON_NULL)
@JsonPropertyOrder({"id", "state", "progress", "request", "dates", "dropped", "results", "createdAt", "startedAt", "finishedAt", "error",
        "links", "caution"})
public record EvaluationView(long id, String state, JobView.Progress progress, JsonNode request, JsonNode dates, JsonNode dropped,
                             JsonNode results, Instant createdAt, Instant startedAt, Instant finishedAt, String error,
                             Map<String, String> links, String caution) {
    /** Every evaluation answer carries it. */
    public static final String CAUTION = "Out-of-sample statistics of estimates from historical returns; past forecast quality does not "
            + "promise future quality, and none of this is investment advice.";
}
