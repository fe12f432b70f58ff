package eigencov.http;

import io.javalin.config.RoutesConfig;

/**
 * A group of endpoints (panels, models, queries, operations). Each module registers its routes
 * and holds the services it calls; {@link HttpApi} collects the modules given to it by the wiring.
 * Access scopes follow the method: GET and HEAD need {@code read}, anything else {@code write}.
 */
public interface RouteModule {
    void register(RoutesConfig routes);
}
