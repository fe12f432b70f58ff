package eigencov.http;

import eigencov.app.App;
import eigencov.app.AppConfig;
import io.javalin.Javalin;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.util.List;
import java.util.concurrent.CopyOnWriteArrayList;

import static io.restassured.RestAssured.given;
import static org.hamcrest.Matchers.containsString;
import static org.hamcrest.Matchers.not;
import static org.hamcrest.Matchers.startsWith;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

class MetricsEndpointTest {
    private static App app;

    @BeforeAll
    static void start() {
        app = App.create(AppConfig.forTest("metrics")).start();
    }

    @AfterAll
    static void stop() {
        app.close();
    }

    @Test
    void metrics_are_prometheus_text_with_request_histograms_pool_and_jvm() {
        given().port(app.port()).get("/health").then().statusCode(200);
        given().port(app.port()).get("/no/such/thing-42").then().statusCode(404);
        given().port(app.port()).get("/metrics").then()
                .statusCode(200)
                .contentType(startsWith("text/plain"))
                .body(containsString("http_server_requests_seconds_bucket{method=\"GET\",route=\"/health\",status=\"200\",le=\"0.001\"}"))
                .body(containsString("route=\"unmatched\",status=\"404\""))
                .body(not(containsString("thing-42")))
                .body(containsString("hikaricp_connections_active{pool=\"eigencov-db\"}"))
                .body(containsString("jvm_memory_used_bytes"));
    }

    @Test
    void requests_are_observed_by_route_template_with_their_status() throws Exception {
        List<String> seen = new CopyOnWriteArrayList<>();
        RouteModule things = routes -> routes.get("/v1/things/{name}", ctx -> {
            if (ctx.pathParam("name").equals("bad")) throw ApiException.badField("name", "is bad");
            ctx.result("ok");
        });
        Javalin http = HttpApi.create("127.0.0.1", 0, 1 << 20, 0, HttpApi.objectMapper(), () -> true, ApiKeys.none(), List.of(things),
                (method, route, status, nanos) -> {
                    assertTrue(nanos >= 0, "duration " + nanos);
                    seen.add(method + " " + route + " " + status);
                }).start();
        // A plain client: these routes exist only in this test, not in the API contract the suite checks.
        HttpClient client = HttpClient.newHttpClient();
        try {
            assertEquals(200, get(client, http.port(), "/v1/things/alpha"));
            assertEquals(400, get(client, http.port(), "/v1/things/bad"));
            assertEquals(404, get(client, http.port(), "/elsewhere"));
        } finally {
            http.stop();
        }
        // The request logger runs after the response is sent, so by stop() every request has been observed.
        assertEquals(List.of("GET /v1/things/{name} 200", "GET /v1/things/{name} 400", "GET unmatched 404"), seen);
    }

    private static int get(HttpClient client, int port, String path) throws Exception {
        return client.send(HttpRequest.newBuilder(URI.create("http://127.0.0.1:" + port + path)).build(),
                HttpResponse.BodyHandlers.discarding()).statusCode();
    }
}
