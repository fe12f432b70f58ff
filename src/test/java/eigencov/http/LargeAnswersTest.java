package eigencov.http;

import eigencov.app.App;
import eigencov.app.AppConfig;
import eigencov.math.FactorModel;
import eigencov.service.InMemoryFits;
import eigencov.service.TestFits;
import io.restassured.RestAssured;
import io.restassured.http.ContentType;
import io.restassured.response.Response;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

import java.time.LocalDate;
import java.util.List;
import java.util.Map;

import static io.restassured.RestAssured.given;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * Answers on a universe of 2,500 long ticker names: the {@code .npy} formats list every row in a
 * header of about 50 KB, beyond the 8 KB header buffer a response starts with, so these take the
 * server's larger header room (HttpApi).
 */
class LargeAnswersTest {
    private static final int NAMES = 2_500;
    private static final FactorModel MODEL = TestFits.synthetic("LONGTICKERNAME.", NAMES, 3, 3L, true);
    private static App app;

    @BeforeAll
    static void start() {
        InMemoryFits fits = new InMemoryFits().add(TestFits.served(5, "wide", LocalDate.parse("2025-03-31"), MODEL, 30, List.of(), 4L));
        app = App.create(AppConfig.forTest("large-answers"), fits).start();
        RestAssured.port = app.port();
    }

    @AfterAll
    static void stop() {
        app.close();
    }

    @Test
    void npy_of_every_name_carries_a_header_list_beyond_the_default_header_buffer() {
        List<String> tickers = MODEL.tickers();
        String list = String.join(",", tickers);
        assertTrue(list.length() > 8 * 1024 * 5, "the header list should be far beyond 8 KB, was " + list.length());
        Response r = given().accept("application/x-npy").contentType(ContentType.JSON)
                .body(Map.of("tickers", tickers)).post("/v1/models/wide/exposures");
        r.then().statusCode(200).header("X-Tickers", list).header("X-Fit-Id", "5");
        double[][] rows = NpyReader.read(r.asByteArray());
        assertEquals(NAMES, rows.length);
        for (int i = 0; i < NAMES; i += 499) {
            for (int j = 0; j < 3; j++) assertEquals(MODEL.exposure(i, j), rows[i][j], 0.0);
            assertEquals(MODEL.specificVariance(i), rows[i][3], 0.0);
        }
    }

    @Test
    void json_answers_go_whole_with_a_length_when_small_and_streamed_when_they_outgrow_that() throws Exception {
        Response small = given().contentType(ContentType.JSON).body(Map.of("tickers", MODEL.tickers().subList(0, 20)))
                .post("/v1/models/wide/exposures");
        small.then().statusCode(200);
        assertEquals(Integer.toString(small.asByteArray().length), small.header("Content-Length"));

        Response large = given().contentType(ContentType.JSON).body(Map.of("tickers", MODEL.tickers()))
                .post("/v1/models/wide/exposures");
        large.then().statusCode(200).header("Transfer-Encoding", "chunked");
        assertTrue(large.asByteArray().length > ResponseSender.WHOLE_BODY_BYTES, "size " + large.asByteArray().length);
        var body = QueryFixture.json(large);
        assertEquals(NAMES, body.get("exposures").size());
        assertEquals(MODEL.exposure(NAMES - 1, 2), body.get("exposures").get(NAMES - 1).get(2).doubleValue(), 0.0);
        assertEquals(MODEL.specificVariance(1234), body.get("specificVariance").get(1234).doubleValue(), 0.0);
    }

    @Test
    void a_query_body_over_the_size_limit_is_a_413_problem() {
        Map<String, Double> weights = new java.util.LinkedHashMap<>();
        for (String t : MODEL.tickers()) weights.put(t, 1.0 / NAMES);
        try (App small = App.create(AppConfig.forTest("large-answers-limit").withMaxBodyBytes(4096),
                new InMemoryFits().add(TestFits.served(5, "wide", LocalDate.parse("2025-03-31"), MODEL, 30, List.of(), 4L))).start()) {
            given().port(small.port()).contentType(ContentType.JSON).body(Map.of("weights", weights)).post("/v1/models/wide/risk")
                    .then().statusCode(413).contentType(Problem.CONTENT_TYPE);
            given().port(small.port()).contentType(ContentType.JSON).body(Map.of("weights", Map.of("LONGTICKERNAME.0001", 1.0)))
                    .post("/v1/models/wide/risk").then().statusCode(200);
        }
    }

    @Test
    void a_small_answer_after_a_large_header_is_unaffected() {
        given().accept("application/x-npy").contentType(ContentType.JSON).body(Map.of("tickers", MODEL.tickers()))
                .post("/v1/models/wide/exposures").then().statusCode(200);
        Response r = given().accept("application/x-npy").queryParam("tickers", "LONGTICKERNAME.0007").get("/v1/models/wide/exposures");
        r.then().statusCode(200).header("X-Tickers", "LONGTICKERNAME.0007");
        assertEquals(MODEL.exposure(7, 1), NpyReader.read(r.asByteArray())[0][1], 0.0);
    }
}
