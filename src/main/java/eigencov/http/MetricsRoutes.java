package eigencov.http;

import io.javalin.config.RoutesConfig;

import java.util.function.Supplier;

/**
 * {@code GET /metrics}: the process's meters in Prometheus text format. Like every GET it needs
 * the {@code read} scope when API keys are configured (it names models and panels and shows
 * traffic); Prometheus sends the key with {@code authorization: {credentials: ...}} in its scrape
 * configuration. {@code /health} and {@code /ready} stay open for load balancers.
 */
public final class MetricsRoutes implements RouteModule {
    private final Supplier<String> scrape;
    private final String contentType;

    public MetricsRoutes(Supplier<String> scrape, String contentType) {
        this.scrape = scrape;
        this.contentType = contentType;
    }

    @Override
    public void register(RoutesConfig routes) {
        routes.get("/metrics", ctx -> ctx.contentType(contentType).result(scrape.get()));
    }
}
