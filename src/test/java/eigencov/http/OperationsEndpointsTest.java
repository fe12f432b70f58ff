package eigencov.http;

import eigencov.app.App;
import eigencov.app.AppConfig;
import io.restassured.RestAssured;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

import static io.restassured.RestAssured.given;
import static org.hamcrest.Matchers.equalTo;
import static org.hamcrest.Matchers.startsWith;

class OperationsEndpointsTest {
    private static App app;

    @BeforeAll
    static void start() {
        app = App.create(AppConfig.forTest("ops")).start();
        RestAssured.port = app.port();
    }

    @AfterAll
    static void stop() {
        app.close();
    }

    @Test
    void health_and_ready_answer_when_the_store_is_up() {
        given().get("/health").then().statusCode(200).body("status", equalTo("up"));
        given().get("/ready").then().statusCode(200).body("status", equalTo("ready"));
    }

    @Test
    void unknown_route_is_a_404_problem_with_request_id() {
        given().header(HttpApi.REQUEST_ID, "abc-123").get("/v1/nothing-here").then()
                .statusCode(404)
                .contentType(startsWith(Problem.CONTENT_TYPE))
                .header(HttpApi.REQUEST_ID, "abc-123")
                .body("status", equalTo(404))
                .body("type", equalTo("/problems/not-found"))
                .body("instance", equalTo("/v1/nothing-here"));
    }

    @Test
    void serves_its_openapi_document() {
        given().get("/openapi.yaml").then().statusCode(200)
                .contentType(startsWith("application/yaml"))
                .body(org.hamcrest.Matchers.containsString("openapi: 3.1.0"));
    }
}
