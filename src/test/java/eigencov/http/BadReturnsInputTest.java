package eigencov.http;

import eigencov.app.App;
import eigencov.app.AppConfig;
import io.restassured.RestAssured;
import io.restassured.response.Response;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.Arguments;
import org.junit.jupiter.params.provider.MethodSource;

import java.io.ByteArrayInputStream;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.charset.StandardCharsets;
import java.util.stream.Stream;

import static io.restassured.RestAssured.given;
import static org.hamcrest.Matchers.equalTo;
import static org.hamcrest.Matchers.hasSize;
import static org.hamcrest.Matchers.not;
import static org.hamcrest.Matchers.emptyString;
import static org.hamcrest.Matchers.startsWith;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * Every kind of bad upload (issue 2, point 7) is a located 4xx problem and stores nothing: the
 * panel "seeded" holds two rows before each case and exactly those two after it.
 */
class BadReturnsInputTest {
    private static final long MAX_BODY = 4 * 1024;
    private static final String CSV = "text/csv";
    private static final String JSON = "application/json";
    private static App app;

    @BeforeAll
    static void start() {
        app = App.create(AppConfig.forTest("bad").withMaxBodyBytes(MAX_BODY)).start();
        RestAssured.port = app.port();
    }

    @AfterAll
    static void stop() {
        app.close();
    }

    @BeforeEach
    void seed() {
        given().contentType(CSV).body("date,ticker,value\n2025-01-02,AAA,0.01\n2025-01-02,BBB,0.02\n")
                .post("/v1/panels/seeded/returns").then().statusCode(200);
    }

    private static Arguments bad(String name, String contentType, String body, int status, Integer row, String field) {
        return Arguments.of(name, contentType, body, status, row, field);
    }

    static Stream<Arguments> badUploads() {
        String ok = "2025-01-03,AAA,0.01\n";
        return Stream.of(
                bad("malformed JSON", JSON, "{\"returns\": [{\"date\": \"2025-01-03\", \"ticker\": \"AAA\", \"value\": 0.1}, {\"date\": ", 400, 2, "date"),
                bad("JSON not an object", JSON, "[1, 2]", 400, null, "body"),
                bad("JSON unknown row field", JSON, "{\"returns\": [{\"date\": \"2025-01-03\", \"ticker\": \"AAA\", \"value\": 0.1, \"weight\": 1}]}", 400, 1, "weight"),
                bad("JSON value as string", JSON, "{\"returns\": [{\"date\": \"2025-01-03\", \"ticker\": \"AAA\", \"value\": \"0.1\"}]}", 400, 1, "value"),
                bad("JSON missing ticker", JSON, "{\"returns\": [{\"date\": \"2025-01-03\", \"ticker\": \"AAA\", \"value\": 0.1}, {\"date\": \"2025-01-03\", \"value\": 0.1}]}", 400, 2, "ticker"),
                bad("JSON non-finite value", JSON, "{\"returns\": [{\"date\": \"2025-01-03\", \"ticker\": \"AAA\", \"value\": 1e999}]}", 400, 1, "value"),
                bad("malformed CSV quote", CSV, "date,ticker,value\n" + ok + "2025-01-03,\"BBB,0.02\n", 400, 2, "ticker"),
                bad("malformed CSV extra field", CSV, "date,ticker,value\n" + ok + "2025-01-03,BBB,0.02,9\n", 400, 2, null),
                bad("wrong header", CSV, "day,ticker,value\n" + ok, 400, null, "header"),
                bad("empty CSV body", CSV, "", 400, null, "header"),
                bad("CSV missing value", CSV, "date,ticker,value\n" + ok + "2025-01-03,BBB\n", 400, 2, "value"),
                bad("unparsable date", CSV, "date,ticker,value\n" + ok + "03/01/2025,BBB,0.02\n", 400, 2, "date"),
                bad("impossible date", CSV, "date,ticker,value\n" + ok + "2025-02-30,BBB,0.02\n", 400, 2, "date"),
                bad("ticker with space", CSV, "date,ticker,value\n" + ok + "2025-01-03,B B,0.02\n", 400, 2, "ticker"),
                bad("ticker too long", CSV, "date,ticker,value\n" + ok + "2025-01-03," + "A".repeat(33) + ",0.02\n", 400, 2, "ticker"),
                bad("empty ticker", CSV, "date,ticker,value\n" + ok + "2025-01-03,,0.02\n", 400, 2, "ticker"),
                bad("NaN value", CSV, "date,ticker,value\n" + ok + "2025-01-03,BBB,NaN\n", 400, 2, "value"),
                bad("infinite value", CSV, "date,ticker,value\n" + ok + "2025-01-03,BBB,-Infinity\n", 400, 2, "value"),
                bad("not a number", CSV, "date,ticker,value\n" + ok + "2025-01-03,BBB,1.2.3\n", 400, 2, "value"),
                bad("total loss", CSV, "date,ticker,value\n" + ok + "2025-01-03,BBB,-1\n", 400, 2, "value"),
                bad("more than total loss", CSV, "date,ticker,value\n" + ok + "2025-01-03,BBB,-1.5\n", 400, 2, "value"),
                bad("above the cap", CSV, "date,ticker,value\n" + ok + "2025-01-03,BBB,10.5\n", 400, 2, "value"),
                bad("same key, other value", CSV, "date,ticker,value\n" + ok + "2025-01-04,BBB,0.1\n2025-01-03,AAA,0.02\n", 400, 3, "value"),
                bad("unknown content type", "text/plain", "date,ticker,value\n" + ok, 415, null, "Content-Type"),
                bad("no content type", null, "date,ticker,value\n" + ok, 415, null, "Content-Type"),
                bad("body over the limit", CSV, "date,ticker,value\n" + ok.repeat((int) (MAX_BODY / ok.length()) + 1), 413, null, "body"));
    }

    @ParameterizedTest(name = "{0}")
    @MethodSource("badUploads")
    void bad_upload_is_a_located_problem_and_stores_nothing(String name, String contentType, String body, int status, Integer row, String field) {
        var req = given().body(body.getBytes(StandardCharsets.UTF_8));
        if (contentType != null) req = req.contentType(contentType);
        else req = req.noContentType();
        Response r = req.post("/v1/panels/seeded/returns");
        assertProblem(r, status, row, field);
        assertSeededUnchanged();
    }

    @ParameterizedTest(name = "{0}")
    @MethodSource("badUploads")
    void bad_upload_into_a_new_panel_creates_nothing(String name, String contentType, String body, int status, Integer row, String field) {
        var req = given().body(body.getBytes(StandardCharsets.UTF_8));
        req = contentType != null ? req.contentType(contentType) : req.noContentType();
        assertProblem(req.post("/v1/panels/never/returns"), status, row, field);
        given().get("/v1/panels/never").then().statusCode(404);
    }

    private static void assertProblem(Response r, int status, Integer row, String field) {
        r.then().statusCode(status)
                .contentType(startsWith(Problem.CONTENT_TYPE))
                .body("type", startsWith("/problems/"))
                .body("title", not(emptyString()))
                .body("status", equalTo(status))
                .body("detail", not(emptyString()))
                .body("errors", not(hasSize(0)))
                .body("errors[0].row", row == null ? equalTo(null) : equalTo(row))
                .body("errors[0].field", field == null ? equalTo(null) : equalTo(field))
                .body("errors[0].message", not(emptyString()));
    }

    private static void assertSeededUnchanged() {
        given().get("/v1/panels/seeded").then().statusCode(200).body("rows", equalTo(2)).body("tickers", equalTo(2));
        String back = given().accept("text/csv").get("/v1/panels/seeded/returns").then().extract().asString();
        assertEquals("date,ticker,value\n2025-01-02,AAA,0.01\n2025-01-02,BBB,0.02\n", back);
    }

    @Test
    void streamed_body_without_length_is_cut_at_the_limit() throws Exception {
        byte[] body = ("date,ticker,value\n" + "2025-01-03,AAA,0.01\n".repeat(1000)).getBytes(StandardCharsets.US_ASCII);
        HttpRequest req = HttpRequest.newBuilder(URI.create("http://127.0.0.1:" + app.port() + "/v1/panels/seeded/returns"))
                .header("Content-Type", CSV)
                .POST(HttpRequest.BodyPublishers.ofInputStream(() -> new ByteArrayInputStream(body)))
                .build();
        HttpResponse<String> res = HttpClient.newHttpClient().send(req, HttpResponse.BodyHandlers.ofString());
        assertEquals(413, res.statusCode(), res.body());
        assertTrue(res.headers().firstValue("Content-Type").orElse("").startsWith(Problem.CONTENT_TYPE));
        assertSeededUnchanged();
    }

    @Test
    void bad_panel_name_is_rejected_naming_the_panel() {
        given().contentType(CSV).body("date,ticker,value\n2025-01-03,AAA,0.01\n").post("/v1/panels/bad name!/returns").then()
                .statusCode(400).contentType(startsWith(Problem.CONTENT_TYPE)).body("errors[0].field", equalTo("panel"));
        given().contentType(CSV).body("date,ticker,value\n2025-01-03,AAA,0.01\n").post("/v1/panels/" + "p".repeat(65) + "/returns").then()
                .statusCode(400).body("errors[0].field", equalTo("panel"));
        given().get("/v1/panels/bad name!").then().statusCode(400).body("errors[0].field", equalTo("panel"));
    }

    @Test
    void many_bad_rows_are_listed_up_to_one_hundred_with_the_total_in_the_detail() {
        StringBuilder sb = new StringBuilder("date,ticker,value\n");
        for (int i = 0; i < 150; i++) sb.append("2025-01-03,T").append(i).append(",x\n");
        given().contentType(CSV).body(sb.toString()).post("/v1/panels/seeded/returns").then()
                .statusCode(400).body("errors", hasSize(100)).body("errors[99].row", equalTo(100))
                .body("detail", org.hamcrest.Matchers.containsString("149 more"));
        assertSeededUnchanged();
    }
}
