package eigencov.http;

import eigencov.app.App;
import eigencov.app.AppConfig;
import eigencov.service.SyntheticReturns;
import io.restassured.RestAssured;
import io.restassured.http.ContentType;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

import java.time.LocalDate;
import java.util.List;

import static io.restassured.RestAssured.given;
import static org.hamcrest.Matchers.contains;
import static org.hamcrest.Matchers.containsString;
import static org.hamcrest.Matchers.equalTo;
import static org.hamcrest.Matchers.hasItem;
import static org.hamcrest.Matchers.hasKey;
import static org.hamcrest.Matchers.not;
import static org.hamcrest.Matchers.hasSize;
import static org.hamcrest.Matchers.notNullValue;
import static org.hamcrest.Matchers.nullValue;
import static org.hamcrest.Matchers.startsWith;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

class ModelEndpointsTest {
    private static final String SPEC = "{\"panel\": \"demo\", \"windowDays\": 40, \"factors\": {\"rule\": \"fixed\", \"count\": 2}, "
            + "\"minCoverage\": 0.9, \"basis\": \"covariance\"}";
    private static App app;
    private static List<LocalDate> dates;

    @BeforeAll
    static void start() {
        app = App.create(AppConfig.forTest("models-http")).start();
        RestAssured.port = app.port();
        dates = SyntheticReturns.weekdays(LocalDate.of(2024, 1, 1), 60);
        given().contentType("text/csv").body(SyntheticReturns.csv(SyntheticReturns.rows(21, SyntheticReturns.tickers(10), dates)))
                .post("/v1/panels/demo/returns").then().statusCode(200);
        put("listed", SPEC, 201);
    }

    @AfterAll
    static void stop() {
        app.close();
    }

    private static void put(String model, String body, int status) {
        given().contentType(ContentType.JSON).body(body).put("/v1/models/" + model).then().statusCode(status);
    }

    @Test
    void PUT_creates_with_201_replaces_with_200_and_echoes_the_stored_spec_with_defaults() {
        given().contentType(ContentType.JSON).body(SPEC).put("/v1/models/crud").then()
                .statusCode(201)
                .body("name", equalTo("crud"))
                .body("panel", equalTo("demo"))
                .body("windowDays", equalTo(40))
                .body("factors.rule", equalTo("fixed"))
                .body("factors.count", equalTo(2))
                .body("specificFloor", equalTo(0.05f))
                .body("refitOnIngest", equalTo(false))
                .body("version", equalTo(1))
                .body("latestFit", nullValue());
        String replaced = SPEC.replace("\"covariance\"", "\"correlation\", \"halfLifeDays\": 20, \"refit\": {\"every\": \"PT24H\"}");
        given().contentType(ContentType.JSON).body(replaced).put("/v1/models/crud").then()
                .statusCode(200)
                .body("basis", equalTo("correlation"))
                .body("halfLifeDays", equalTo(20.0f))
                .body("refit.every", equalTo("PT24H"))
                .body("version", equalTo(2));
        given().get("/v1/models/crud").then().statusCode(200).body("basis", equalTo("correlation")).body("version", equalTo(2));
        given().get("/v1/models").then().statusCode(200).body("models.name", hasItem("crud"));
        given().delete("/v1/models/crud").then().statusCode(204);
        given().get("/v1/models/crud").then().statusCode(404).contentType(startsWith(Problem.CONTENT_TYPE));
        given().delete("/v1/models/crud").then().statusCode(404);
    }

    @ParameterizedTest(name = "{0} -> {1} on {2}")
    @CsvSource(delimiter = '|', value = {
            "\"windowDays\": 40|\"windowDays\": 10|400|windowDays",
            "\"windowDays\": 40|\"windowDays\": \"long\"|400|windowDays",
            "\"minCoverage\": 0.9|\"minCoverage\": 0|400|minCoverage",
            "\"minCoverage\": 0.9|\"minCoverage\": 1.5|400|minCoverage",
            "\"rule\": \"fixed\", \"count\": 2|\"rule\": \"magic\"|400|factors.rule",
            "\"count\": 2|\"count\": 0|400|factors.count",
            "\"count\": 2|\"share\": 0.5|400|factors.count",
            "\"rule\": \"fixed\", \"count\": 2|\"rule\": \"variance-share\", \"share\": 1.5|400|factors.share",
            "\"rule\": \"fixed\", \"count\": 2|\"rule\": \"bai-ng\"|400|factors.max",
            "\"rule\": \"fixed\", \"count\": 2|\"rule\": \"fixed\", \"count\": 2, \"hold\": 3|400|factors.hold",
            "\"rule\": \"fixed\", \"count\": 2|\"rule\": \"bai-ng\", \"max\": 5, \"hold\": 0|400|factors.hold",
            "\"rule\": \"fixed\", \"count\": 2|\"rule\": \"bai-ng\", \"max\": 5, \"hold\": 53|400|factors.hold",
            "\"basis\": \"covariance\"|\"basis\": \"covariance\", \"halfLifeDays\": -5|400|halfLifeDays",
            "\"basis\": \"covariance\"|\"basis\": \"covariance\", \"refit\": {\"every\": \"daily\"}|400|refit.every",
            "\"basis\": \"covariance\"|\"basis\": \"covariance\", \"refit\": {\"every\": \"PT5S\"}|400|refit.every",
            "\"basis\": \"covariance\"|\"basis\": \"diagonal\"|400|basis",
            "\"basis\": \"covariance\"|\"basis\": \"covariance\", \"alignment\": \"procrustes\"|400|alignment",
            "\"basis\": \"covariance\"|\"basis\": \"covariance\", \"specificFloor\": 1|400|specificFloor",
            "\"basis\": \"covariance\"|\"basis\": \"covariance\", \"colour\": \"blue\"|400|colour",
            "\"rule\": \"fixed\"|\"rule\": \"fixed\", \"steps\": 3|400|factors.steps",
            "\"panel\": \"demo\", |''|400|panel",
            "\"panel\": \"demo\"|\"panel\": \"nowhere\"|422|panel",
    })
    void PUT_rejects_an_invalid_spec_naming_the_field(String from, String to, int status, String field) {
        String body = SPEC.replace(from, to);
        given().contentType(ContentType.JSON).body(body).put("/v1/models/bad").then()
                .statusCode(status)
                .contentType(startsWith(Problem.CONTENT_TYPE))
                .body("status", equalTo(status))
                .body("errors.field", hasItem(field));
        given().get("/v1/models/bad").then().statusCode(404);
    }

    @Test
    void a_hold_on_k_keeps_the_previous_k_until_the_rule_has_disagreed_in_that_many_fits() {
        String low = SPEC.replace("\"rule\": \"fixed\", \"count\": 2", "\"rule\": \"variance-share\", \"share\": 0.01, \"hold\": 2");
        given().contentType(ContentType.JSON).body(low).put("/v1/models/held").then().statusCode(201)
                .body("factors.hold", equalTo(2)).body("factors.share", equalTo(0.01f));
        // a 1 % share is met by one factor
        fitHeld(dates.get(45), 1, 1, 0);
        // the rule now wants many more factors; the first disagreeing fit keeps k = 1 ...
        put("held", low.replace("0.01", "0.99"), 200);
        int wanted = fitHeld(dates.get(50), 1, -1, 1);
        assertTrue(wanted > 1, "a 99 % share needs more than one factor, the rule said " + wanted);
        // ... the second one in a row follows the rule, and the count starts again
        fitHeld(dates.get(55), wanted, wanted, 0);
        fitHeld(dates.get(56), wanted, wanted, 0);
        // without a hold, k follows the rule at once
        put("held", low.replace(", \"hold\": 2", ""), 200);
        given().contentType(ContentType.JSON).body("{\"asOf\": \"" + dates.get(57) + "\"}").post("/v1/models/held/fits").then()
                .statusCode(201).body("k", equalTo(1)).body("diagnostics.factorCount.parameters", not(hasKey("hold.fits")));
    }

    @Test
    void alignment_rotate_turns_a_refit_onto_the_previous_factors_and_reports_it() {
        String rotate = SPEC.replace("\"basis\": \"covariance\"", "\"basis\": \"covariance\", \"alignment\": \"rotate\"");
        given().contentType(ContentType.JSON).body(rotate).put("/v1/models/turned").then().statusCode(201)
                .body("alignment", equalTo("rotate"));
        given().contentType(ContentType.JSON).body("{\"asOf\": \"" + dates.get(45) + "\"}").post("/v1/models/turned/fits").then()
                .statusCode(201)
                .body("diagnostics.alignment.rotation.applied", equalTo(false))
                .body("diagnostics.alignment.rotation.reason", equalTo("first fit"));
        given().contentType(ContentType.JSON).body("{\"asOf\": \"" + dates.get(55) + "\"}").post("/v1/models/turned/fits").then()
                .statusCode(201)
                .body("diagnostics.alignment.rotation.applied", equalTo(true))
                .body("diagnostics.alignment.rotation.matrix", hasSize(4));
        // the factor covariance is R' F R: no longer diagonal, still symmetric
        List<List<Float>> f = given().get("/v1/models/turned/factors").then().statusCode(200).extract().path("factorCovariance");
        assertEquals(f.get(0).get(1), f.get(1).get(0));
        assertTrue(f.get(0).get(1) != 0f, "off-diagonal " + f.get(0).get(1));
        // a signs-only model says so with a null rotation
        given().contentType(ContentType.JSON).body("{\"asOf\": \"" + dates.get(45) + "\"}").post("/v1/models/listed/fits").then()
                .statusCode(201).body("diagnostics.alignment.rotation", nullValue());
    }

    /** Fits model "held" as of {@code asOf}, checks k and the hold's evidence (ruleK -1: any), returns the rule's k. */
    private static int fitHeld(LocalDate asOf, int k, int ruleK, int disagreements) {
        var r = given().contentType(ContentType.JSON).body("{\"asOf\": \"" + asOf + "\"}").post("/v1/models/held/fits").then()
                .statusCode(201)
                .body("k", equalTo(k))
                .body("diagnostics.factorCount.k", equalTo(k))
                .body("diagnostics.factorCount.parameters.'hold.fits'", equalTo(2.0f))
                .body("diagnostics.factorCount.parameters.'hold.disagreements'", equalTo((float) disagreements));
        float said = r.extract().path("diagnostics.factorCount.parameters.'hold.ruleK'");
        if (ruleK > 0) assertEquals(ruleK, (int) said);
        return (int) said;
    }

    @Test
    void PUT_rejects_an_empty_body_and_a_bad_model_name() {
        put("empty", "", 400);
        given().contentType(ContentType.JSON).body(SPEC).put("/v1/models/bad*name").then()
                .statusCode(400).body("errors.field", hasItem("model"));
    }

    @Test
    void POST_fits_now_and_as_of_then_list_newest_first_and_read_one_in_detail() {
        put("fitted", SPEC, 201);
        LocalDate asOf = dates.get(45);
        int backfill = given().contentType(ContentType.JSON).body("{\"asOf\": \"" + asOf + "\"}").post("/v1/models/fitted/fits").then()
                .statusCode(201)
                .body("status", equalTo("ok"))
                .body("origin", equalTo("request"))
                .body("asOf", equalTo(asOf.toString()))
                .body("window.to", equalTo(asOf.toString()))
                .body("window.from", equalTo(dates.get(6).toString()))
                .body("dates", equalTo(40))
                .body("k", equalTo(2))
                .body("tickers", equalTo(10))
                .body("universe", hasSize(10))
                .body("eigenvalues", hasSize(10))
                .body("varianceShare", hasSize(10))
                .body("diagnostics.factorCount", notNullValue())
                .body("diagnostics.imputation", notNullValue())
                .body("diagnostics.alignment", notNullValue())
                .body("diagnostics.excluded", hasSize(0))
                .body("diagnostics.effectiveObservations", equalTo(40.0f))
                .body("diagnostics.spec.windowDays", equalTo(40))
                .body("diagnostics.specVersion", equalTo(1))
                .body("timings.loadMs", notNullValue())
                .body("timings.computeMs", notNullValue())
                .body("timings.storeMs", notNullValue())
                .body("createdAt", notNullValue())
                .extract().path("id");
        int now = given().post("/v1/models/fitted/fits").then().statusCode(201)
                .body("window.to", equalTo(dates.get(59).toString())).extract().path("id");
        given().get("/v1/models/fitted/fits").then().statusCode(200)
                .body("fits.id", contains(now, backfill))
                .body("fits[0].universe", nullValue())
                .body("fits[0].k", equalTo(2));
        given().get("/v1/models/fitted/fits/" + backfill).then().statusCode(200)
                .body("id", equalTo(backfill)).body("universe", hasSize(10)).body("eigenvalues[0]", notNullValue());
        given().get("/v1/models/fitted").then().statusCode(200).body("latestFit.id", equalTo(now));
        given().get("/v1/models").then().statusCode(200).body("models.find { it.name == 'fitted' }.latestFit.id", equalTo(now));
    }

    @Test
    void a_fit_the_data_cannot_support_is_a_422_recorded_in_the_history_with_its_reason() {
        put("short", SPEC, 201);
        given().contentType(ContentType.JSON).body("{\"asOf\": \"" + dates.get(10) + "\"}").post("/v1/models/short/fits").then()
                .statusCode(422)
                .contentType(startsWith(Problem.CONTENT_TYPE))
                .body("type", equalTo("/problems/fit-failed"))
                .body("errors[0].field", equalTo("asOf"))
                .body("detail", containsString("11 dates"));
        given().get("/v1/models/short/fits").then().statusCode(200)
                .body("fits", hasSize(1))
                .body("fits[0].status", equalTo("failed"))
                .body("fits[0].reason", containsString("needs 40"));
        int id = given().get("/v1/models/short/fits").then().extract().path("fits[0].id");
        given().get("/v1/models/short/fits/" + id).then().statusCode(200).body("status", equalTo("failed"));
        given().get("/v1/models/short").then().body("latestFit", nullValue());
    }

    @ParameterizedTest(name = "{0} {1} -> {2}")
    @CsvSource(delimiter = '|', value = {
            "POST|/v1/models/nothing/fits||404",
            "GET|/v1/models/nothing/fits||404",
            "GET|/v1/models/nothing/fits/1||404",
            "GET|/v1/models/listed/fits/999999||404",
            "GET|/v1/models/listed/fits/abc||400",
            "POST|/v1/models/listed/fits|{\"asOf\": \"2024-13-01\"}|400",
            "POST|/v1/models/listed/fits|{\"asOf\": \"2024-03-01\", \"extra\": 1}|400",
            "POST|/v1/models/listed/fits|not json|400",
    })
    void fit_endpoints_answer_bad_requests_and_unknown_things_with_problems(String method, String path, String body, int status) {
        var req = given().contentType(ContentType.JSON);
        if (body != null) req = req.body(body);
        req.request(method, path).then().statusCode(status).contentType(startsWith(Problem.CONTENT_TYPE)).body("status", equalTo(status));
    }

    @Test
    void a_window_never_reaches_past_its_as_of_date() {
        put("pit", SPEC, 201);
        LocalDate saturday = dates.get(45).plusDays(6 - dates.get(45).getDayOfWeek().getValue());
        given().contentType(ContentType.JSON).body("{\"asOf\": \"" + saturday + "\"}").post("/v1/models/pit/fits").then()
                .statusCode(201)
                .body("asOf", equalTo(saturday.toString()))
                .body("window.to", equalTo(saturday.minusDays(1).toString()));
    }
}
