package eigencov.http;

import com.fasterxml.jackson.databind.DeserializationFeature;
import com.fasterxml.jackson.databind.ObjectReader;
import eigencov.service.FitService;
import eigencov.service.InvalidInputException;
import eigencov.service.ModelService;
import eigencov.service.ModelSpec;
import io.javalin.config.RoutesConfig;
import io.javalin.http.Context;

import java.io.IOException;
import java.time.LocalDate;
import java.util.Map;

/**
 * Model specs and fits: {@code PUT/GET/DELETE /v1/models/{model}}, {@code GET /v1/models},
 * {@code POST/GET /v1/models/{model}/fits}, {@code GET /v1/models/{model}/fits/{id}}.
 */
public final class ModelRoutes implements RouteModule {
    /**
     * Specs are read strictly: a fraction where a whole number belongs (windowDays, factors.count,
     * shortHistory.minObservations) is a 400 naming the field, not silently truncated.
     */
    private static final ObjectReader SPEC_READER = HttpApi.objectMapper().readerFor(ModelSpec.class)
            .without(DeserializationFeature.ACCEPT_FLOAT_AS_INT);
    private final ModelService models;
    private final FitService fits;

    public ModelRoutes(ModelService models, FitService fits) {
        this.models = models;
        this.fits = fits;
    }

    /** Body of {@code POST .../fits}: optional asOf (backfill); empty body = fit now. */
    record FitRequest(LocalDate asOf) {
    }

    @Override
    public void register(RoutesConfig routes) {
        routes.get("/v1/models", ctx -> ctx.json(Map.of("models", models.list())));
        routes.put("/v1/models/{model}", this::put);
        routes.get("/v1/models/{model}", ctx -> ctx.json(models.get(ctx.pathParam("model"))));
        routes.delete("/v1/models/{model}", ctx -> {
            models.delete(ctx.pathParam("model"));
            ctx.status(204);
        });
        routes.post("/v1/models/{model}/fits", this::fit);
        routes.get("/v1/models/{model}/fits", ctx -> ctx.json(Map.of("fits", fits.list(ctx.pathParam("model")))));
        routes.get("/v1/models/{model}/fits/{id}", ctx -> ctx.json(fits.get(ctx.pathParam("model"), fitId(ctx))));
    }

    private void put(Context ctx) throws IOException {
        if (ctx.body().isBlank()) throw InvalidInputException.field("body", "a model spec is required");
        // a JsonProcessingException goes to HttpApi's mapper: 400 naming the JSON path
        ModelService.PutResult r = models.put(ctx.pathParam("model"), SPEC_READER.readValue(ctx.body()));
        ctx.status(r.created() ? 201 : 200).json(r.model());
    }

    private void fit(Context ctx) {
        LocalDate asOf = ctx.body().isBlank() ? null : ctx.bodyAsClass(FitRequest.class).asOf();
        ctx.status(201).json(fits.fit(ctx.pathParam("model"), asOf, FitService.REQUEST));
    }

    private static long fitId(Context ctx) {
        String s = ctx.pathParam("id");
        try {
            return Long.parseLong(s);
        } catch (NumberFormatException e) {
            throw InvalidInputException.field("id", "fit ids are whole numbers, was '" + s + "'");
        }
    }
}
