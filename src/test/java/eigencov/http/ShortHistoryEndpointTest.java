package eigencov.http;

import com.fasterxml.jackson.databind.JsonNode;
import eigencov.app.App;
import eigencov.app.AppConfig;
import eigencov.service.SyntheticReturns;
import io.restassured.http.ContentType;
import io.restassured.response.Response;
import io.restassured.specification.RequestSpecification;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

import java.nio.file.Path;
import java.time.LocalDate;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

import static eigencov.http.QueryFixture.json;
import static eigencov.http.QueryFixture.strings;
import static io.restassured.RestAssured.given;
import static org.hamcrest.Matchers.containsString;
import static org.hamcrest.Matchers.equalTo;
import static org.hamcrest.Matchers.hasItem;
import static org.hamcrest.Matchers.not;
import static org.hamcrest.Matchers.startsWith;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * Short-history names end to end (docs/design.md section 6): a recent listing with 100 of the 252
 * window dates is below the 90 % coverage threshold, and a model with
 * {@code "shortHistory": {"minObservations": 60}} serves it in every query; a listing with 30 dates
 * stays excluded with its reason. The names are stored with the fit: a restarted process answers the
 * same.
 */
class ShortHistoryEndpointTest {
    private static final int DAYS = 300;
    private static final String SPEC = "{\"panel\": \"listings\", \"windowDays\": 252, \"factors\": {\"rule\": \"fixed\", \"count\": 2}, "
            + "\"minCoverage\": 0.9, \"basis\": \"covariance\", \"shortHistory\": {\"minObservations\": 60}}";

    /** 20 names with the whole history; NEWCO listed 100 dates before the end, FRESH 30. */
    private static String panelCsv() {
        List<String> tickers = new ArrayList<>(SyntheticReturns.tickers(20));
        tickers.add("NEWCO");
        tickers.add("FRESH");
        List<LocalDate> dates = SyntheticReturns.weekdays(LocalDate.of(2024, 1, 1), DAYS);
        List<SyntheticReturns.Row> rows = new ArrayList<>();
        for (SyntheticReturns.Row r : SyntheticReturns.rows(31, tickers, dates)) {
            int t = dates.indexOf(r.date());
            if (r.ticker().equals("NEWCO") && t < DAYS - 100) continue;
            if (r.ticker().equals("FRESH") && t < DAYS - 30) continue;
            rows.add(r);
        }
        return SyntheticReturns.csv(rows);
    }

    private static RequestSpecification at(App app) {
        return given().port(app.port());
    }

    private static JsonNode query(App app, String path, Object body) {
        Response r = at(app).contentType(ContentType.JSON).body(body).post("/v1/models/recent/" + path);
        r.then().statusCode(200);
        return json(r);
    }

    @Test
    void a_recent_listing_is_served_in_every_query_listed_as_short_history_and_kept_across_a_restart(@TempDir Path dir) {
        AppConfig config = AppConfig.forTest("unused").withDbUrl("jdbc:h2:file:" + dir.resolve("eigencov").toAbsolutePath());
        String covarianceBefore;
        try (App app = App.create(config).start()) {
            at(app).contentType("text/csv").body(panelCsv()).post("/v1/panels/listings/returns").then().statusCode(200);
            at(app).contentType(ContentType.JSON).body(SPEC).put("/v1/models/recent").then().statusCode(201)
                    .body("shortHistory.minObservations", equalTo(60));
            JsonNode fit = json(at(app).contentType(ContentType.JSON).post("/v1/models/recent/fits").then().statusCode(201)
                    .extract().response());
            assertEquals(1, fit.get("shortHistory").size());
            assertEquals("NEWCO", fit.get("shortHistory").get(0).get("ticker").asText());
            assertEquals(100, fit.get("shortHistory").get(0).get("observations").asInt());
            assertTrue(!strings(fit.get("universe")).contains("NEWCO"), "apart from the universe");
            assertEquals(20, fit.get("tickers").asInt(), "the universe's size");
            JsonNode excluded = fit.get("diagnostics").get("excluded");
            assertEquals(1, excluded.size(), "only FRESH stays excluded");
            assertEquals("FRESH", excluded.get(0).get("ticker").asText());
            assertEquals("coverage", excluded.get(0).get("reason").asText());

            JsonNode cov = query(app, "covariance", Map.of("tickers", List.of("T00", "NEWCO", "T01")));
            assertEquals(List.of("NEWCO"), strings(cov.get("shortHistory")));
            JsonNode factor = query(app, "covariance", Map.of("tickers", List.of("NEWCO"), "form", "factor"));
            assertEquals(List.of("NEWCO"), strings(factor.get("shortHistory")));
            JsonNode exp = query(app, "exposures", Map.of("tickers", List.of("T05", "NEWCO")));
            assertEquals(List.of("NEWCO"), strings(exp.get("shortHistory")));
            // NEWCO loads on the market like the others (planted loading 0.7-1.3): a beta near 1
            double beta = exp.get("beta").get(1).doubleValue();
            assertTrue(beta > 0.5 && beta < 1.5, "beta of NEWCO " + beta);
            Map<String, Double> w = new LinkedHashMap<>();
            w.put("T02", 0.5);
            w.put("NEWCO", 0.5);
            JsonNode risk = query(app, "risk", Map.of("weights", w, "benchmark", Map.of("T03", 1.0)));
            assertEquals(List.of("NEWCO"), strings(risk.get("shortHistory")));
            assertEquals(beta, risk.get("byAsset").get(1).get("beta").doubleValue(), 0, "the same fit property");
            assertEquals(List.of("NEWCO"), strings(query(app, "precision", Map.of("tickers", List.of("NEWCO", "T04"))).get("shortHistory")));
            JsonNode mv = query(app, "minimum-variance", Map.of("tickers", List.of("NEWCO", "T04", "T07")));
            assertEquals(List.of("NEWCO"), strings(mv.get("shortHistory")));
            at(app).contentType(ContentType.JSON).accept("text/csv").body(Map.of("tickers", List.of("NEWCO", "T00")))
                    .post("/v1/models/recent/covariance").then().statusCode(200).header("X-Short-History", "NEWCO");
            JsonNode plain = query(app, "covariance", Map.of("tickers", List.of("T00", "T01")));
            assertEquals(List.of(), strings(plain.get("shortHistory")), "an answer without them lists none");

            at(app).contentType(ContentType.JSON).body(Map.of("tickers", List.of("T00", "FRESH"))).post("/v1/models/recent/covariance")
                    .then().statusCode(422).contentType(startsWith(Problem.CONTENT_TYPE))
                    .body("errors[0].field", equalTo("tickers[1]"))
                    .body("errors[0].message", containsString("coverage: 30 observations"));
            covarianceBefore = at(app).contentType(ContentType.JSON).body(Map.of("tickers", List.of("T00", "NEWCO", "T01")))
                    .post("/v1/models/recent/covariance").asString();
        }
        try (App app = App.create(config).start()) {
            at(app).get("/v1/models/recent/fits/1").then().statusCode(200)
                    .body("shortHistory[0].ticker", equalTo("NEWCO")).body("shortHistory[0].observations", equalTo(100));
            String after = at(app).contentType(ContentType.JSON).body(Map.of("tickers", List.of("T00", "NEWCO", "T01")))
                    .post("/v1/models/recent/covariance").asString();
            assertEquals(covarianceBefore, after, "the stored fit answers the same after a restart");
        }
    }

    @Test
    void without_the_option_the_recent_listing_is_refused_as_before() {
        try (App app = App.create(AppConfig.forTest("short-history-off")).start()) {
            at(app).contentType("text/csv").body(panelCsv()).post("/v1/panels/listings/returns").then().statusCode(200);
            at(app).contentType(ContentType.JSON).body(SPEC.replace(", \"shortHistory\": {\"minObservations\": 60}", ""))
                    .put("/v1/models/recent").then().statusCode(201).body("$", not(org.hamcrest.Matchers.hasKey("shortHistory")));
            at(app).contentType(ContentType.JSON).post("/v1/models/recent/fits").then().statusCode(201)
                    .body("shortHistory", equalTo(List.of())).body("diagnostics.excluded.ticker", hasItem("NEWCO"));
            at(app).contentType(ContentType.JSON).body(Map.of("tickers", List.of("NEWCO"))).post("/v1/models/recent/covariance").then()
                    .statusCode(422).body("errors[0].message", containsString("coverage: 100 observations"));
        }
    }

    @ParameterizedTest(name = "{0}")
    @CsvSource(delimiter = '|', value = {
            "{\"minObservations\": 3}|shortHistory.minObservations|k + 2 = 4",
            "{\"minObservations\": 253}|shortHistory.minObservations|at most windowDays",
            "{}|shortHistory.minObservations|is required",
            "{\"minObservations\": 60, \"min\": 5}|shortHistory.min|",
            "{\"minObservations\": 60.5}|shortHistory.minObservations|",
    })
    void a_bad_short_history_spec_is_a_400_naming_the_field_and_changes_nothing(String value, String field, String message) {
        String model = "bad" + Integer.toHexString(value.hashCode());
        try (App app = App.create(AppConfig.forTest("short-history-bad")).start()) {
            if (at(app).get("/v1/panels/listings").statusCode() == 404) {
                at(app).contentType("text/csv").body(panelCsv()).post("/v1/panels/listings/returns").then().statusCode(200);
            }
            at(app).contentType(ContentType.JSON).body(SPEC).put("/v1/models/" + model).then().statusCode(201);
            String bad = SPEC.replace("{\"minObservations\": 60}", value);
            at(app).contentType(ContentType.JSON).body(bad).put("/v1/models/" + model).then()
                    .statusCode(400).contentType(startsWith(Problem.CONTENT_TYPE))
                    .body("errors.field", hasItem(field))
                    .body("errors.message", hasItem(containsString(message == null ? "" : message)));
            at(app).get("/v1/models/" + model).then().statusCode(200).body("version", equalTo(1))
                    .body("shortHistory.minObservations", equalTo(60));
        }
    }

    @Test
    void the_bai_ng_maximum_bounds_the_minimum_as_k_plus_2() {
        try (App app = App.create(AppConfig.forTest("short-history-max")).start()) {
            at(app).contentType("text/csv").body(panelCsv()).post("/v1/panels/listings/returns").then().statusCode(200);
            String spec = SPEC.replace("{\"rule\": \"fixed\", \"count\": 2}", "{\"rule\": \"bai-ng\", \"max\": 30}");
            at(app).contentType(ContentType.JSON).body(spec.replace("60}", "31}")).put("/v1/models/m").then()
                    .statusCode(400).body("errors[0].field", equalTo("shortHistory.minObservations"))
                    .body("errors[0].message", containsString("factors.max 30"));
            at(app).contentType(ContentType.JSON).body(spec.replace("60}", "32}")).put("/v1/models/m").then().statusCode(201);
            at(app).get("/v1/models/m").then().statusCode(200).body("shortHistory.minObservations", equalTo(32));
        }
    }
}
