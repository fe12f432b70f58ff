package eigencov.http;

import com.fasterxml.jackson.databind.DeserializationFeature;
import com.fasterxml.jackson.databind.ObjectReader;
import eigencov.service.BackfillService;
import eigencov.service.FitService;
import eigencov.service.InvalidInputException;
import eigencov.service.JobView;
import eigencov.service.ModelService;
import eigencov.service.ModelSpec;
import io.javalin.config.RoutesConfig;
import io.javalin.http.Context;

import java.io.IOException;
import java.time.LocalDate;
import java.util.Map;

/**
 * Model specs and fits: {@code PUT/GET/DELETE /v1/models/{model}}, {@code GET /v1/models},
 * {@code POST/GET /v1/models/{model}/fits}, {@code GET /v1/models/{model}/fits/{id}}. A POST of fits
 * with {@code from}, {@code to} and {@code every} starts a range backfill job (202, docs/design.md section 6).
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
    private final BackfillService backfills;

    public ModelRoutes(ModelService models, FitService fits, BackfillService backfills) {
        this.models = models;
        this.fits = fits;
        this.backfills = backfills;
    }

    /**
     * Body of {@code POST .../fits}: optional asOf (one fit as of that date), or from, to and every (a
     * range backfill job); empty body = fit now.
     */
    record FitRequest(LocalDate asOf, LocalDate from, LocalDate to, String every) {
        boolean range() {
            return from != null || to != null || every != null;
        }
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
        FitRequest r = ctx.body().isBlank() ? null : ctx.bodyAsClass(FitRequest.class);
        if (r != null && r.range()) {
            if (r.asOf() != null) throw InvalidInputException.field("asOf", "give asOf (one fit) or from, to and every (a range backfill), not both");
            JobView job = backfills.submit(ctx.pathParam("model"), r.from(), r.to(), r.every());
            ctx.status(202).header("Location", job.links().get("self")).json(job);
            return;
        }
        ctx.status(201).json(fits.fit(ctx.pathParam("model"), r == null ? null : r.asOf(), FitService.REQUEST));
    }

    private static long fitId(Context ctx) {
        return wholeNumber(ctx, "id", "fit");
    }

    /** Path parameter {@code name} as a whole number; a 400 naming it otherwise. */
    static long wholeNumber(Context ctx, String name, String what) {
        String s = ctx.pathParam(name);
        try {
            return Long.parseLong(s);
        } catch (NumberFormatException e) {
            throw InvalidInputException.field(name, what + " ids are whole numbers, was '" + s + "'");
        }
    }
}
