package eigencov.http;

import eigencov.app.App;
import eigencov.app.AppConfig;
import eigencov.service.SyntheticReturns;
import io.restassured.RestAssured;
import io.restassured.http.ContentType;
import io.restassured.response.ExtractableResponse;
import io.restassured.response.Response;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

import java.time.Duration;
import java.time.LocalDate;
import java.util.List;

import static io.restassured.RestAssured.given;
import static org.hamcrest.Matchers.containsString;
import static org.hamcrest.Matchers.equalTo;
import static org.hamcrest.Matchers.hasItem;
import static org.hamcrest.Matchers.hasSize;
import static org.hamcrest.Matchers.startsWith;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/** Range backfills over HTTP and the job endpoints (docs/design.md section 6, "Jobs"). */
class JobEndpointsTest {
    private static final String SPEC = "{\"panel\": \"jp\", \"windowDays\": 40, \"factors\": {\"rule\": \"fixed\", \"count\": 2}, "
            + "\"minCoverage\": 0.9, \"basis\": \"covariance\"}";
    private static App app;
    private static List<LocalDate> dates;

    @BeforeAll
    static void start() {
        app = App.create(AppConfig.forTest("jobs-http")).start();
        RestAssured.port = app.port();
        dates = SyntheticReturns.weekdays(LocalDate.of(2024, 1, 1), 90);
        given().contentType("text/csv").body(SyntheticReturns.csv(SyntheticReturns.rows(31, SyntheticReturns.tickers(12), dates)))
                .post("/v1/panels/jp/returns").then().statusCode(200);
        for (String m : List.of("weekly", "daily", "second")) {
            given().contentType(ContentType.JSON).body(SPEC).put("/v1/models/" + m).then().statusCode(201);
        }
        BusyJob.prepare();
    }

    @AfterAll
    static void stop() {
        app.close();
    }

    private static ExtractableResponse<Response> backfill(String model, LocalDate from, LocalDate to, String every) {
        return given().contentType(ContentType.JSON).body("{\"from\": \"" + from + "\", \"to\": \"" + to + "\", \"every\": \"" + every + "\"}")
                .post("/v1/models/" + model + "/fits").then().statusCode(202).extract();
    }

    private static long awaitDone(long id) {
        try {
            assertTrue(app.jobs().runner().awaitFinished(id, Duration.ofMinutes(2)).isPresent(), "job " + id + " finished");
        } catch (InterruptedException e) {
            throw new IllegalStateException(e);
        }
        return id;
    }

    @Test
    void a_range_backfill_is_a_202_job_with_its_location_and_fits_one_date_a_week_once() {
        ExtractableResponse<Response> posted = backfill("weekly", dates.get(30), dates.get(89), "week");
        long id = posted.jsonPath().getLong("id");
        assertEquals("/v1/jobs/" + id, posted.header("Location"));
        assertEquals("backfill", posted.jsonPath().getString("kind"));
        assertEquals("/v1/models/weekly", posted.jsonPath().getString("links.model"));
        awaitDone(id);
        // weekly from dates[30] (Mon 2024-02-12) to dates[89] (Fri 2024-05-03): 12 Fridays; 2024-02-16 has fewer than
        // 40 dates up to it (the 40th is 2024-02-23) and fails with the reason, the job goes on
        given().get("/v1/jobs/" + id).then().statusCode(200).body("state", equalTo("done"))
                .body("progress.done", equalTo(12)).body("progress.total", equalTo(12)).body("progress.etaSeconds", equalTo(0))
                .body("model", equalTo("weekly")).body("specVersion", equalTo(1))
                .body("fits", hasSize(11)).body("fits[0].asOf", equalTo("2024-02-23")).body("skipped", hasSize(0))
                .body("failed.asOf", equalTo(List.of("2024-02-16")))
                .body("failed[0].reason", containsString("window needs 40"))
                .body("request.every", equalTo("week")).body("startedAt", startsWith("20")).body("finishedAt", startsWith("20"));
        given().get("/v1/models/weekly/fits").then().body("fits.findAll { it.status == 'ok' }", hasSize(11))
                .body("fits.origin", hasItem("backfill"));
        // asked again: every fitted date is skipped and listed, nothing is fitted twice
        long again = awaitDone(backfill("weekly", dates.get(30), dates.get(89), "week").jsonPath().getLong("id"));
        given().get("/v1/jobs/" + again).then().body("state", equalTo("done")).body("fits", hasSize(0)).body("skipped", hasSize(11))
                .body("failed", hasSize(1));
        given().get("/v1/models/weekly/fits").then().body("fits.findAll { it.status == 'ok' }", hasSize(11));
        // newest first; a finished job cannot be cancelled
        given().get("/v1/jobs").then().statusCode(200).body("jobs[0].id", equalTo((int) again));
        given().delete("/v1/jobs/" + id).then().statusCode(409).contentType(startsWith(Problem.CONTENT_TYPE))
                .body("detail", containsString("done"));
        // the single-date form stays synchronous
        given().contentType(ContentType.JSON).body("{\"asOf\": \"" + dates.get(60) + "\"}").post("/v1/models/weekly/fits").then().statusCode(201);
        String metrics = given().get("/metrics").then().statusCode(200).extract().asString();
        assertTrue(metrics.matches("(?s).*eigencov_jobs\\{kind=\"backfill\",state=\"done\"} [1-9][0-9]*\\.0.*"), "job counts by state and kind");
        assertTrue(metrics.contains("eigencov_jobs{kind=\"evaluation\",state=\"queued\"} 0.0"), metrics.lines().filter(l -> l.contains("jobs")).toList().toString());
    }

    @Test
    void a_job_queued_behind_another_can_be_cancelled_and_then_is_409() {
        long first = BusyJob.start();
        long second = backfill("second", dates.get(39), dates.get(89), "day").jsonPath().getLong("id");
        given().delete("/v1/jobs/" + second).then().statusCode(200).body("state", equalTo("cancelled"))
                .body("progress.etaSeconds", equalTo(null)).body("finishedAt", startsWith("20"));
        awaitDone(first);
        given().get("/v1/jobs/" + second).then().body("state", equalTo("cancelled")).body("fits", hasSize(0));
        given().get("/v1/models/second/fits").then().body("fits", hasSize(0));
        given().delete("/v1/jobs/" + second).then().statusCode(409);
        given().get("/v1/jobs/" + first).then().body("state", equalTo("done")).body("fits", hasSize(201));
    }

    @Test
    void unknown_jobs_are_404_and_a_bad_id_is_400() {
        given().get("/v1/jobs/999999").then().statusCode(404).contentType(startsWith(Problem.CONTENT_TYPE));
        given().delete("/v1/jobs/999999").then().statusCode(404).contentType(startsWith(Problem.CONTENT_TYPE));
        given().get("/v1/jobs/seven").then().statusCode(400).body("errors.field", hasItem("id"));
        given().contentType(ContentType.JSON).body("{\"from\": \"2024-02-01\", \"to\": \"2024-03-01\", \"every\": \"day\"}")
                .post("/v1/models/nope/fits").then().statusCode(404);
    }

    @ParameterizedTest(name = "{0}")
    @CsvSource(delimiter = '|', value = {
        "from after to     | {'from': '2024-03-01', 'to': '2024-02-01', 'every': 'day'}                        | 400 | from",
        "no to             | {'from': '2024-03-01', 'every': 'day'}                                            | 400 | to",
        "no from           | {'to': '2024-03-01', 'every': 'day'}                                              | 400 | from",
        "no every          | {'from': '2024-03-01', 'to': '2024-03-05'}                                        | 400 | every",
        "unknown every     | {'from': '2024-03-01', 'to': '2024-03-05', 'every': 'hourly'}                     | 400 | every",
        "asOf and a range  | {'asOf': '2024-03-01', 'from': '2024-03-01', 'to': '2024-03-05', 'every': 'day'}  | 400 | asOf",
        "no trading date   | {'from': '2030-01-01', 'to': '2030-02-01', 'every': 'day'}                        | 422 | from",
        "unknown field     | {'from': '2024-03-01', 'to': '2024-03-05', 'every': 'day', 'step': 2}             | 400 | step",
        "bad date          | {'from': '2024-13-01', 'to': '2024-03-05', 'every': 'day'}                        | 400 | from",
    })
    void bad_range_backfills_are_4xx_problems_naming_the_field_and_start_nothing(String name, String body, int status, String field) {
        int jobs = given().get("/v1/jobs").then().extract().path("jobs.size()");
        given().contentType(ContentType.JSON).body(body.replace('\'', '"')).post("/v1/models/weekly/fits").then()
                .statusCode(status).contentType(startsWith(Problem.CONTENT_TYPE)).body("errors.field", hasItem(field));
        given().get("/v1/jobs").then().body("jobs", hasSize(jobs));
    }
}
