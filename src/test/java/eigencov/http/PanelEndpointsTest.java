package eigencov.http;

import eigencov.app.App;
import eigencov.app.AppConfig;
import io.restassured.RestAssured;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

import java.util.List;
import java.util.Map;

import static io.restassured.RestAssured.given;
import static org.hamcrest.Matchers.equalTo;
import static org.hamcrest.Matchers.hasItem;
import static org.hamcrest.Matchers.nullValue;
import static org.hamcrest.Matchers.startsWith;
import static org.junit.jupiter.api.Assertions.assertEquals;

class PanelEndpointsTest {
    private static App app;

    @BeforeAll
    static void start() {
        app = App.create(AppConfig.forTest("panels")).start();
        RestAssured.port = app.port();
    }

    @AfterAll
    static void stop() {
        app.close();
    }

    static String csv(String... rows) {
        return "date,ticker,value\n" + String.join("\n", rows) + "\n";
    }

    @Test
    void POST_csv_creates_the_panel_and_reports_counts() {
        given().contentType("text/csv").body(csv("2025-01-02,AAA,0.01", "2025-01-02,BBB,-0.02", "2025-01-03,AAA,0.005"))
                .post("/v1/panels/created/returns").then()
                .statusCode(200)
                .body("received", equalTo(3)).body("inserted", equalTo(3)).body("updated", equalTo(0))
                .body("tickers", equalTo(2)).body("from", equalTo("2025-01-02")).body("to", equalTo("2025-01-03"));
        given().get("/v1/panels/created").then().statusCode(200)
                .body("name", equalTo("created")).body("tickers", equalTo(2)).body("dates", equalTo(2))
                .body("rows", equalTo(3)).body("from", equalTo("2025-01-02")).body("to", equalTo("2025-01-03"));
        given().get("/v1/panels").then().statusCode(200).body("panels.name", hasItem("created"));
    }

    @Test
    void POST_json_is_read_like_csv() {
        String body = "{\"returns\": [{\"date\": \"2025-02-03\", \"ticker\": \"X.L\", \"value\": 0.5},"
                + " {\"value\": -0.25, \"ticker\": \"Y:Z/1\", \"date\": \"2025-02-04\"}]}";
        given().contentType("application/json").body(body).post("/v1/panels/json/returns").then()
                .statusCode(200).body("received", equalTo(2)).body("inserted", equalTo(2)).body("tickers", equalTo(2));
        given().get("/v1/panels/json/returns").then().statusCode(200)
                .body("panel", equalTo("json"))
                .body("returns[0].date", equalTo("2025-02-03")).body("returns[0].ticker", equalTo("X.L"))
                .body("returns[0].value", equalTo(0.5f))
                .body("returns[1].ticker", equalTo("Y:Z/1")).body("returns[1].value", equalTo(-0.25f));
    }

    @Test
    void upsert_replaces_values_and_counts_inserted_versus_updated() {
        given().contentType("text/csv").body(csv("2025-03-03,AAA,0.01", "2025-03-03,BBB,0.02"))
                .post("/v1/panels/upsert/returns").then().statusCode(200).body("inserted", equalTo(2)).body("updated", equalTo(0));
        given().contentType("text/csv").body(csv("2025-03-03,BBB,0.03", "2025-03-04,AAA,0.04", "2025-03-03,AAA,0.01"))
                .post("/v1/panels/upsert/returns").then().statusCode(200)
                .body("received", equalTo(3)).body("inserted", equalTo(1)).body("updated", equalTo(2));
        String back = given().accept("text/csv").get("/v1/panels/upsert/returns").then().statusCode(200)
                .contentType(startsWith("text/csv")).extract().asString();
        assertEquals(csv("2025-03-03,AAA,0.01", "2025-03-03,BBB,0.03", "2025-03-04,AAA,0.04"), back);
        given().get("/v1/panels/upsert").then().body("rows", equalTo(3)).body("dates", equalTo(2));
    }

    @Test
    void identical_repeats_in_one_upload_are_stored_once() {
        given().contentType("text/csv").body(csv("2025-04-01,AAA,0.01", "2025-04-01,AAA,0.01", "2025-04-01,BBB,0.02"))
                .post("/v1/panels/repeats/returns").then().statusCode(200)
                .body("received", equalTo(3)).body("inserted", equalTo(2));
        given().get("/v1/panels/repeats").then().body("rows", equalTo(2));
    }

    @Test
    void read_back_filters_by_tickers_and_dates_in_json_and_csv() {
        given().contentType("text/csv").body(csv("2025-05-01,AAA,0.1", "2025-05-01,BBB,0.2", "2025-05-01,CCC,0.3",
                "2025-05-02,AAA,0.4", "2025-05-02,CCC,0.5", "2025-05-05,AAA,0.6")).post("/v1/panels/filter/returns").then().statusCode(200);
        List<Map<String, Object>> rows = given().queryParam("tickers", "CCC,AAA,NOPE").queryParam("from", "2025-05-02")
                .get("/v1/panels/filter/returns").then().statusCode(200).contentType(startsWith("application/json"))
                .extract().jsonPath().getList("returns");
        assertEquals(List.of(Map.of("date", "2025-05-02", "ticker", "AAA", "value", 0.4f),
                Map.of("date", "2025-05-02", "ticker", "CCC", "value", 0.5f),
                Map.of("date", "2025-05-05", "ticker", "AAA", "value", 0.6f)), rows);
        String csvBack = given().accept("text/csv").queryParam("to", "2025-05-01").get("/v1/panels/filter/returns").then()
                .statusCode(200).extract().asString();
        assertEquals(csv("2025-05-01,AAA,0.1", "2025-05-01,BBB,0.2", "2025-05-01,CCC,0.3"), csvBack);
        String none = given().accept("text/csv").queryParam("tickers", "ZZZ").get("/v1/panels/filter/returns").then()
                .statusCode(200).extract().asString();
        assertEquals("date,ticker,value\n", none);
    }

    @Test
    void read_back_rejects_bad_parameters_as_problems() {
        given().contentType("text/csv").body(csv("2025-06-02,AAA,0.1")).post("/v1/panels/params/returns").then().statusCode(200);
        given().queryParam("from", "June").get("/v1/panels/params/returns").then().statusCode(400)
                .contentType(startsWith(Problem.CONTENT_TYPE)).body("errors[0].field", equalTo("from"));
        given().queryParam("tickers", "A B").get("/v1/panels/params/returns").then().statusCode(400)
                .body("errors[0].field", equalTo("tickers"));
        given().queryParam("from", "2025-06-03").queryParam("to", "2025-06-01").get("/v1/panels/params/returns").then()
                .statusCode(400).body("errors[0].field", equalTo("from"));
    }

    @Test
    void unknown_panel_is_404_on_every_read() {
        for (String path : List.of("/v1/panels/absent", "/v1/panels/absent/returns")) {
            given().get(path).then().statusCode(404).contentType(startsWith(Problem.CONTENT_TYPE))
                    .body("type", equalTo("/problems/not-found")).body("status", equalTo(404));
        }
        given().accept("text/csv").get("/v1/panels/absent/returns").then().statusCode(404)
                .contentType(startsWith(Problem.CONTENT_TYPE));
    }

    @Test
    void empty_upload_creates_an_empty_panel() {
        given().contentType("application/json").body("{\"returns\": []}").post("/v1/panels/empty/returns").then()
                .statusCode(200).body("received", equalTo(0)).body("from", nullValue());
        given().get("/v1/panels/empty").then().statusCode(200).body("rows", equalTo(0)).body("from", nullValue());
    }
}
