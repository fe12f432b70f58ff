package eigencov.http;

import eigencov.service.JobService;
import io.javalin.config.RoutesConfig;

import java.util.Map;

/**
 * Stored jobs (docs/design.md section 6, "Jobs"): {@code GET /v1/jobs} (newest first), {@code GET /v1/jobs/{id}},
 * {@code DELETE /v1/jobs/{id}} (cancel: 200 with the cancelled job; a finished job 409).
 */
public final class JobRoutes implements RouteModule {
    private final JobService jobs;

    public JobRoutes(JobService jobs) {
        this.jobs = jobs;
    }

    @Override
    public void register(RoutesConfig routes) {
        routes.get("/v1/jobs", ctx -> ctx.json(Map.of("jobs", jobs.list(null))));
        routes.get("/v1/jobs/{id}", ctx -> ctx.json(jobs.get(ModelRoutes.wholeNumber(ctx, "id", "job"))));
        routes.delete("/v1/jobs/{id}", ctx -> ctx.json(jobs.cancel(ModelRoutes.wholeNumber(ctx, "id", "job"))));
    }
}
