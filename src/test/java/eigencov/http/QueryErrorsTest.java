package eigencov.http;

import com.fasterxml.jackson.databind.JsonNode;
import eigencov.app.App;
import io.restassured.RestAssured;
import io.restassured.response.Response;
import io.restassured.specification.RequestSpecification;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

import java.util.ArrayList;
import java.util.List;
import java.util.stream.Stream;

import static eigencov.http.QueryFixture.json;
import static io.restassured.RestAssured.given;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

/** Every bad query input is a problem+json with the right status naming the field. */
class QueryErrorsTest {
    private static final String COV = "/v1/models/synth/covariance";
    private static final String RISK = "/v1/models/synth/risk";
    private static App app;

    @BeforeAll
    static void start() {
        app = QueryFixture.start("errors");
        RestAssured.port = app.port();
    }

    @AfterAll
    static void stop() {
        app.close();
    }

    /** One bad request: GET when body is null; query as name=value pairs; field null = no field expected. */
    record Bad(String why, String path, String query, String body, String accept, int status, String type, String field) {
        @Override
        public String toString() {
            return why;
        }
    }

    private static Bad get(String why, String path, String query, int status, String type, String field) {
        return new Bad(why, path, query, null, null, status, type, field);
    }

    private static Bad post(String why, String path, String body, int status, String type, String field) {
        return new Bad(why, path, "", body, null, status, type, field);
    }

    static Stream<Bad> badRequests() {
        List<String> names = new ArrayList<>();
        for (int i = 0; i < 3001; i++) names.add("\"N" + i + "\"");
        String tooMany = "{\"tickers\":[" + String.join(",", names) + "]}";
        return Stream.of(
                get("asOf and fit together", COV, "tickers=T0001&asOf=2025-03-01&fit=10", 400, "validation", "asOf"),
                get("asOf not a date", COV, "tickers=T0001&asOf=2025-13-01", 400, "validation", "asOf"),
                get("fit not a number", COV, "tickers=T0001&fit=latest", 400, "validation", "fit"),
                get("fit not positive", COV, "tickers=T0001&fit=0", 400, "validation", "fit"),
                get("asOf given twice", COV, "tickers=T0001&asOf=2025-03-01&asOf=2025-03-02", 400, "validation", "asOf"),
                get("missing neither error nor omit", COV, "tickers=T0001&missing=ignore", 400, "validation", "missing"),
                get("no tickers parameter", COV, "", 400, "validation", "tickers"),
                get("empty ticker list", COV, "tickers=", 400, "validation", "tickers"),
                get("empty entry in ticker list", COV, "tickers=T0001,,T0002", 400, "validation", "tickers[1]"),
                get("duplicate ticker", COV, "tickers=T0001,T0002,T0001", 400, "validation", "tickers[2]"),
                get("malformed ticker", COV, "tickers=T0001,T%20X", 400, "validation", "tickers[1]"),
                get("unknown form", COV, "tickers=T0001&form=cube", 400, "validation", "form"),
                get("unknown scale", COV, "tickers=T0001&scale=weekly", 400, "validation", "scale"),
                get("scale and horizonDays together", COV, "tickers=T0001&scale=annual&horizonDays=5", 400, "validation", "horizonDays"),
                get("horizonDays zero", COV, "tickers=T0001&horizonDays=0", 400, "validation", "horizonDays"),
                get("horizonDays not a number", COV, "tickers=T0001&horizonDays=ten", 400, "validation", "horizonDays"),
                get("correlation not a boolean", COV, "tickers=T0001&correlation=yes", 400, "validation", "correlation"),
                get("correlation with factor form", COV, "tickers=T0001&form=factor&correlation=true", 400, "validation", "correlation"),
                get("unknown query parameter", COV, "tickers=T0001&horizon=5", 400, "validation", "horizon"),
                post("POST without tickers", COV, "{}", 400, "validation", "tickers"),
                post("POST with empty ticker list", COV, "{\"tickers\":[]}", 400, "validation", "tickers"),
                post("POST with a null ticker", COV, "{\"tickers\":[\"T0001\",null]}", 400, "validation", "tickers[1]"),
                post("POST with duplicate tickers", COV, "{\"tickers\":[\"T0001\",\"T0001\"]}", 400, "validation", "tickers[1]"),
                post("POST with fractional horizonDays", COV, "{\"tickers\":[\"T0001\"],\"horizonDays\":2.5}", 400, "validation", "horizonDays"),
                post("POST with unknown field", COV, "{\"tickers\":[\"T0001\"],\"colour\":\"red\"}", 400, "validation", "colour"),
                post("POST with tickers not a list", COV, "{\"tickers\":\"T0001\"}", 400, "validation", "tickers"),
                post("POST with malformed JSON", COV, "{\"tickers\":[", 400, "validation", "tickers[0]"),
                post("POST with an empty body", COV, "", 400, "validation", "body"),
                post("POST with JSON null", COV, "null", 400, "validation", "body"),
                post("matrix of more than 3000 names", COV, tooMany, 400, "validation", "tickers"),
                post("POST with an empty-string ticker", COV, "{\"tickers\":[\"\"]}", 400, "validation", "tickers[0]"),
                new Bad("Accept nothing offered", COV, "tickers=T0001", null, "image/png", 406, "not-acceptable", "Accept"),
                new Bad("Accept with q=0 for all offered", COV, "tickers=T0001", null, "application/json;q=0, */*;q=0", 406, "not-acceptable", "Accept"),
                new Bad("factor form as npy", COV, "tickers=T0001&form=factor", null, "application/x-npy", 406, "not-acceptable", "Accept"),
                new Bad("factor form as csv", COV, "tickers=T0001&form=factor", null, "text/csv", 406, "not-acceptable", "Accept"),
                new Bad("factors as csv", "/v1/models/synth/factors", "", null, "text/csv", 406, "not-acceptable", "Accept"),
                new Bad("risk as npy", RISK, "", "{\"weights\":{\"T0001\":1}}", "application/x-npy", 406, "not-acceptable", "Accept"),
                get("unknown ticker", COV, "tickers=T0001,NOPE", 422, "unknown-tickers", "tickers[1]"),
                get("excluded ticker", "/v1/models/synth/exposures", "tickers=GONE", 422, "unknown-tickers", "tickers[0]"),
                get("all tickers omitted", COV, "tickers=NOPE&missing=omit", 422, "unknown-tickers", "tickers[0]"),
                get("unknown model", "/v1/models/nomodel/covariance", "tickers=T0001", 404, "not-found", null),
                get("malformed model name", "/v1/models/bad%20name/factors", "", 400, "validation", "model"),
                get("no fit as of the date", COV, "tickers=T0001&asOf=2020-01-01", 404, "not-found", null),
                get("no such fit id", COV, "tickers=T0001&fit=99", 404, "not-found", null),
                get("from after to", "/v1/models/synth/factor-returns", "from=2025-03-20&to=2025-03-10", 400, "validation", "from"),
                get("from not a date", "/v1/models/synth/factor-returns", "from=yesterday", 400, "validation", "from"),
                post("risk without weights", RISK, "{}", 400, "validation", "weights"),
                post("risk with empty weights", RISK, "{\"weights\":{}}", 400, "validation", "weights"),
                post("risk with a NaN weight", RISK, "{\"weights\":{\"T0001\":0.5,\"T0002\":\"NaN\"}}", 400, "validation", "weights.T0002"),
                post("risk with an infinite weight", RISK, "{\"weights\":{\"T0001\":1e999}}", 400, "validation", "weights.T0001"),
                post("risk with a null weight", RISK, "{\"weights\":{\"T0001\":null}}", 400, "validation", "weights.T0001"),
                post("risk with a non-numeric weight", RISK, "{\"weights\":{\"T0001\":\"half\"}}", 400, "validation", "weights.T0001"),
                post("risk with a ticker twice", RISK, "{\"weights\":{\"T0001\":0.5,\"T0002\":0.1,\"T0001\":0.5}}", 400, "validation", "weights.T0001"),
                post("risk with a benchmark ticker twice", RISK, "{\"weights\":{\"T0001\":1},\"benchmark\":{\"T0002\":0.5,\"T0002\":0.5}}", 400, "validation", "benchmark.T0002"),
                post("risk with weights twice", RISK, "{\"weights\":{\"T0001\":1},\"weights\":{\"T0002\":1}}", 400, "validation", "weights"),
                post("risk with scale twice", RISK, "{\"weights\":{\"T0001\":1},\"scale\":\"daily\",\"scale\":\"annual\"}", 400, "validation", "scale"),
                post("risk with an unknown field", RISK, "{\"weights\":{\"T0001\":1},\"colour\":\"red\"}", 400, "validation", "colour"),
                post("risk with a fractional horizon", RISK, "{\"weights\":{\"T0001\":1},\"horizonDays\":2.5}", 400, "validation", "horizonDays"),
                post("risk with weights as a list", RISK, "{\"weights\":[0.5]}", 400, "validation", "weights"),
                post("risk with a weight as a list", RISK, "{\"weights\":{\"T0001\":[0.5]}}", 400, "validation", "weights.T0001"),
                post("risk body as a list", RISK, "[]", 400, "validation", "body"),
                post("risk with a malformed ticker", RISK, "{\"weights\":{\"T 1\":1}}", 400, "validation", "weights"),
                post("risk with a NaN benchmark weight", RISK, "{\"weights\":{\"T0001\":1},\"benchmark\":{\"T0002\":\"NaN\"}}", 400, "validation", "benchmark.T0002"),
                post("risk with scale and horizonDays", RISK, "{\"weights\":{\"T0001\":1},\"scale\":\"annual\",\"horizonDays\":5}", 400, "validation", "scale"),
                post("risk with unknown ticker", RISK, "{\"weights\":{\"T0001\":1,\"NOPE\":1}}", 422, "unknown-tickers", "weights.NOPE"));
    }

    @Test
    void body_problems_name_the_json_that_was_expected() {
        JsonNode unknown = json(given().contentType("application/json").body("{\"weights\":{\"T0001\":1},\"colour\":1}").post(RISK));
        assertEquals("unknown field 'colour'; the fields are benchmark, horizonDays, scale, weights",
                unknown.get("errors").get(0).get("message").asText());
        JsonNode list = json(given().contentType("application/json").body("[]").post(COV));
        assertEquals("expected an object, found an array", list.get("errors").get(0).get("message").asText());
        JsonNode fraction = json(given().contentType("application/json").body("{\"weights\":{\"T0001\":1},\"horizonDays\":2.5}").post(RISK));
        assertEquals("expected a whole number, found 2.5", fraction.get("errors").get(0).get("message").asText());
        JsonNode text = json(given().contentType("application/json").body("{\"weights\":{\"T0001\":\"half\"}}").post(RISK));
        assertEquals("weights.T0001", text.get("errors").get(0).get("field").asText());
        assertFalse(text.get("errors").get(0).get("message").asText().isBlank());
    }

    @ParameterizedTest(name = "{0}")
    @MethodSource("badRequests")
    void bad_query_input_is_a_problem_naming_the_field(Bad bad) {
        RequestSpecification req = given().urlEncodingEnabled(false);
        if (bad.accept() != null) req = req.accept(bad.accept());
        String url = bad.path() + (bad.query().isEmpty() ? "" : "?" + bad.query());
        Response r = bad.body() == null ? req.get(url) : req.contentType("application/json").body(bad.body()).post(url);
        r.then().statusCode(bad.status()).contentType(Problem.CONTENT_TYPE);
        JsonNode p = json(r);
        assertEquals(bad.status(), p.get("status").asInt());
        assertEquals("/problems/" + bad.type(), p.get("type").asText());
        assertFalse(p.get("detail").asText().isBlank());
        // problems speak JSON, not Java: no class names a client could not act on
        assertFalse(p.toString().matches("(?s).*(eigencov\\.|java\\.|JsonToken).*"), "Java names in " + p);
        if (bad.field() != null) {
            List<String> fields = new ArrayList<>();
            p.get("errors").forEach(e -> fields.add(e.path("field").asText()));
            assertTrue(fields.contains(bad.field()), "fields " + fields + " should name " + bad.field() + "; problem " + p);
        }
    }
}
