package eigencov.http;

import com.fasterxml.jackson.core.JsonParser;
import com.fasterxml.jackson.core.io.NumberOutput;
import com.fasterxml.jackson.databind.DeserializationFeature;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.ObjectReader;
import eigencov.service.EvaluationJob;
import eigencov.service.EvaluationRequest;
import eigencov.service.EvaluationSeries;
import eigencov.service.EvaluationService;
import eigencov.service.InvalidInputException;
import eigencov.service.JobView;
import io.javalin.config.RoutesConfig;
import io.javalin.http.Context;

import java.io.IOException;
import java.util.List;
import java.util.Map;

/**
 * Model evaluations (docs/design.md section 6, "Evaluation"): {@code POST /v1/evaluations} (202 with the job,
 * {@code Location: /v1/evaluations/{id}}), {@code GET /v1/evaluations}, {@code GET /v1/evaluations/{id}},
 * {@code GET /v1/evaluations/{id}/series} (JSON or CSV).
 */
public final class EvaluationRoutes implements RouteModule {
    private static final List<Representation> SERIES_FORMATS = List.of(Representation.JSON, Representation.CSV);
    static final String SERIES_HEADER = "date,model,baseline,z,minimumVarianceReturn,minimumVarianceVolatility";

    private final EvaluationService evaluations;
    private final ObjectReader requestReader;

    public EvaluationRoutes(EvaluationService evaluations, ObjectMapper mapper) {
        this.evaluations = evaluations;
        // strict: a fractional horizonDays or a repeated key is an error, not silently resolved
        this.requestReader = mapper.readerFor(EvaluationRequest.class)
                .with(JsonParser.Feature.STRICT_DUPLICATE_DETECTION)
                .without(DeserializationFeature.ACCEPT_FLOAT_AS_INT);
    }

    @Override
    public void register(RoutesConfig routes) {
        routes.post("/v1/evaluations", this::start);
        routes.get("/v1/evaluations", ctx -> ctx.json(Map.of("evaluations", evaluations.list())));
        routes.get("/v1/evaluations/{id}", ctx -> ctx.json(evaluations.get(id(ctx))));
        routes.get("/v1/evaluations/{id}/series", this::series);
    }

    private void start(Context ctx) throws IOException {
        if (ctx.body().isBlank()) throw InvalidInputException.field("body", "an evaluation request is required");
        EvaluationRequest r = requestReader.readValue(ctx.body());
        JobView job = evaluations.submit(r);
        ctx.status(202).header("Location", "/v1/evaluations/" + job.id()).json(job);
    }

    private void series(Context ctx) {
        Representation rep = Representation.negotiate(ctx.header("Accept"), SERIES_FORMATS);
        EvaluationSeries s = evaluations.series(id(ctx));
        if (rep == Representation.JSON) {
            ctx.json(Map.of("series", s.series()));
            return;
        }
        StringBuilder csv = new StringBuilder(64 * (s.series().size() + 1)).append(SERIES_HEADER).append('\n');
        for (EvaluationJob.SeriesRow r : s.series()) {
            csv.append(r.date()).append(',').append(r.model()).append(',').append(r.baseline() == null ? "" : r.baseline()).append(',')
                    .append(number(r.z())).append(',').append(number(r.minimumVarianceReturn())).append(',')
                    .append(number(r.minimumVarianceVolatility())).append('\n');
        }
        ctx.contentType(Representation.CSV.contentType).result(csv.toString());
    }

    private static String number(Double v) {
        return v == null ? "" : NumberOutput.toString(v, true);
    }

    private static long id(Context ctx) {
        return ModelRoutes.wholeNumber(ctx, "id", "evaluation");
    }
}
