package eigencov.service;

import com.fasterxml.jackson.annotation.JsonInclude;

import java.time.LocalDate;
import java.util.List;

/**
 * {@code POST /v1/evaluations} (docs/design.md section 6): 1-8 stored models on one panel, the forecast
 * dates ({@code from}, {@code to}, {@code every}), the horizon, optional random portfolios and baselines.
 * Boxed fields, so that a missing one is reported by name rather than defaulted silently.
 */
@JsonInclude(JsonInclude.Include.NON_NULL)
public record EvaluationRequest(List<String> models, LocalDate from, LocalDate to, String every, Integer horizonDays, Random random,
                                List<String> baselines) {
    /** {@code count} portfolios of {@code names} names each, drawn with {@code seed} (default 1). */
    @JsonInclude(JsonInclude.Include.NON_NULL)
    public record Random(Integer count, Integer names, Long seed) {
    }

    public EvaluationRequest {
        models = models == null ? null : List.copyOf(models);
        baselines = baselines == null ? null : List.copyOf(baselines);
    }
}
