package eigencov.http;

import com.fasterxml.jackson.databind.JsonNode;
import eigencov.app.App;
import io.restassured.RestAssured;
import io.restassured.http.ContentType;
import io.restassured.response.Response;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

import java.util.Arrays;
import java.util.List;
import java.util.Map;

import static eigencov.http.QueryFixture.FEB;
import static eigencov.http.QueryFixture.FEB_FIT;
import static eigencov.http.QueryFixture.MAR;
import static eigencov.http.QueryFixture.MAR_FIT;
import static eigencov.http.QueryFixture.assertFit;
import static eigencov.http.QueryFixture.assertMatrix;
import static eigencov.http.QueryFixture.json;
import static eigencov.http.QueryFixture.matrix;
import static eigencov.http.QueryFixture.strings;
import static io.restassured.RestAssured.given;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

class CovarianceEndpointTest {
    /** Same sums in another order: agreement to rounding, relative to the largest entry. */
    private static final double ALGEBRAIC = 1e-12;
    private static final List<String> NAMES = List.of("T0007", "T0003", "T0031", "T0012", "T0000");
    private static final String PATH = "/v1/models/synth/covariance";
    private static App app;

    @BeforeAll
    static void start() {
        app = QueryFixture.start("covariance");
        RestAssured.port = app.port();
    }

    @AfterAll
    static void stop() {
        app.close();
    }

    private static Response post(Object body, String... query) {
        var req = given().contentType(ContentType.JSON).body(body);
        for (int i = 0; i < query.length; i += 2) req = req.queryParam(query[i], query[i + 1]);
        return req.post(PATH);
    }

    @Test
    void POST_matrix_equals_B_F_Bt_plus_D_of_the_newest_fit_in_request_order() {
        Response r = post(Map.of("tickers", NAMES));
        r.then().statusCode(200).contentType(ContentType.JSON).header("X-Fit-Id", "11").header("X-Caution", ResponseSender.CAUTION);
        JsonNode body = json(r);
        assertFit(body.get("fit"), MAR_FIT);
        assertEquals(ResponseSender.CAUTION, body.get("caution").asText());
        assertEquals(NAMES, strings(body.get("tickers")));
        assertEquals(List.of(), strings(body.get("omitted")));
        assertEquals("daily", body.get("scale").get("name").asText());
        assertMatrix(NaiveCovariance.of(MAR, NAMES, 1), matrix(body.get("matrix")), ALGEBRAIC);
    }

    @Test
    void GET_takes_the_same_options_as_query_parameters() {
        Response r = given().queryParam("tickers", String.join(",", NAMES)).queryParam("scale", "annual").get(PATH);
        r.then().statusCode(200);
        assertMatrix(NaiveCovariance.of(MAR, NAMES, 252), matrix(json(r).get("matrix")), ALGEBRAIC);
        Response repeated = given().queryParam("tickers", NAMES.get(0)).queryParam("tickers", NAMES.get(1)).get(PATH);
        assertEquals(NAMES.subList(0, 2), strings(json(repeated).get("tickers")));
    }

    @Test
    void annual_scale_is_252_daily_variances_and_horizon_days_multiply_by_h() {
        JsonNode annual = json(post(Map.of("tickers", NAMES, "scale", "annual")));
        assertEquals(252, annual.get("scale").get("days").asInt());
        assertMatrix(NaiveCovariance.of(MAR, NAMES, 252), matrix(annual.get("matrix")), ALGEBRAIC);
        JsonNode tenDays = json(post(Map.of("tickers", NAMES, "horizonDays", 10)));
        assertEquals("horizon", tenDays.get("scale").get("name").asText());
        assertMatrix(NaiveCovariance.of(MAR, NAMES, 10), matrix(tenDays.get("matrix")), ALGEBRAIC);
    }

    @Test
    void correlation_has_unit_diagonal_and_matches_the_scaled_covariance() {
        JsonNode body = json(post(Map.of("tickers", NAMES, "correlation", true, "scale", "annual")));
        double[][] c = matrix(body.get("matrix"));
        for (int i = 0; i < c.length; i++) assertEquals(1.0, c[i][i], 1e-15);
        assertMatrix(NaiveCovariance.correlation(MAR, NAMES), c, ALGEBRAIC);
        assertTrue(body.get("correlation").asBoolean());
    }

    @Test
    void factor_form_returns_the_parts_that_rebuild_the_matrix() {
        JsonNode body = json(post(Map.of("tickers", NAMES, "form", "factor", "scale", "annual")));
        assertEquals("factor", body.get("form").asText());
        int k = body.get("factors").asInt();
        assertEquals(MAR.factors(), k);
        double[][] b = matrix(body.get("exposures"));
        double[][] f = matrix(body.get("factorCovariance"));
        JsonNode d = body.get("specificVariance");
        for (int r = 0; r < NAMES.size(); r++) {
            int i = MAR.indexOf(NAMES.get(r));
            for (int a = 0; a < k; a++) assertEquals(MAR.exposure(i, a), b[r][a], 0.0, "exposures are not scaled");
            assertEquals(252 * MAR.specificVariance(i), d.get(r).doubleValue(), 1e-15);
        }
        double[][] rebuilt = new double[NAMES.size()][NAMES.size()];
        for (int r = 0; r < rebuilt.length; r++) {
            for (int s = 0; s < rebuilt.length; s++) {
                double v = r == s ? d.get(r).doubleValue() : 0;
                for (int a = 0; a < k; a++) for (int c = 0; c < k; c++) v += b[r][a] * f[a][c] * b[s][c];
                rebuilt[r][s] = v;
            }
        }
        assertMatrix(NaiveCovariance.of(MAR, NAMES, 252), rebuilt, ALGEBRAIC);
    }

    @Test
    void csv_has_a_ticker_header_row_and_a_ticker_first_column() {
        Response r = given().accept("text/csv").queryParam("tickers", String.join(",", NAMES)).get(PATH);
        r.then().statusCode(200).contentType(org.hamcrest.Matchers.startsWith("text/csv")).header("X-Fit-Id", "11");
        String[] lines = r.asString().split("\n");
        assertEquals("ticker," + String.join(",", NAMES), lines[0]);
        assertEquals(NAMES.size() + 1, lines.length);
        double[][] m = new double[NAMES.size()][];
        for (int i = 0; i < NAMES.size(); i++) {
            String[] cells = lines[i + 1].split(",");
            assertEquals(NAMES.get(i), cells[0]);
            m[i] = Arrays.stream(cells, 1, cells.length).mapToDouble(Double::parseDouble).toArray();
        }
        assertMatrix(NaiveCovariance.of(MAR, NAMES, 1), m, ALGEBRAIC);
    }

    @Test
    void npy_is_version_1_little_endian_float64_with_tickers_in_a_header() {
        Response r = given().accept("application/x-npy").contentType(ContentType.JSON)
                .body(Map.of("tickers", NAMES, "horizonDays", 21)).post(PATH);
        r.then().statusCode(200).header("X-Fit-Id", "11").header("X-Tickers", String.join(",", NAMES));
        // binary: exactly the media type, no charset parameter (openapi/eigencov.yaml, Npy)
        assertEquals("application/x-npy", r.header("Content-Type"));
        byte[] bytes = r.asByteArray();
        assertEquals(Integer.parseInt(r.header("Content-Length")), bytes.length);
        assertMatrix(NaiveCovariance.of(MAR, NAMES, 21), NpyReader.read(bytes), ALGEBRAIC);
    }

    @Test
    void missing_omit_answers_on_the_covered_tickers_and_lists_the_others() {
        List<String> asked = List.of("T0001", "ZZZ", "GONE", "T0002");
        JsonNode body = json(post(Map.of("tickers", asked), "missing", "omit"));
        assertEquals(List.of("T0001", "T0002"), strings(body.get("tickers")));
        assertEquals(List.of("ZZZ", "GONE"), strings(body.get("omitted")));
        assertMatrix(NaiveCovariance.of(MAR, List.of("T0001", "T0002"), 1), matrix(body.get("matrix")), ALGEBRAIC);
        given().accept("application/x-npy").queryParam("tickers", String.join(",", asked)).queryParam("missing", "omit").get(PATH)
                .then().statusCode(200).header("X-Tickers", "T0001,T0002").header("X-Omitted", "ZZZ,GONE");
    }

    @Test
    void missing_error_is_a_422_listing_unknown_and_excluded_tickers_with_reasons() {
        Response r = post(Map.of("tickers", List.of("T0001", "ZZZ", "GONE")));
        r.then().statusCode(422).contentType(Problem.CONTENT_TYPE);
        JsonNode p = json(r);
        assertEquals("/problems/unknown-tickers", p.get("type").asText());
        assertEquals("tickers[1]", p.get("errors").get(0).get("field").asText());
        assertTrue(p.get("errors").get(0).get("message").asText().contains("'ZZZ' is not in the fit"));
        assertEquals("tickers[2]", p.get("errors").get(1).get("field").asText());
        assertTrue(p.get("errors").get(1).get("message").asText().contains("excluded from the fit (coverage: 12 observations, 27 required)"));
    }

    @Test
    void asOf_and_fit_select_the_fit_the_answer_names() {
        JsonNode byDate = json(post(Map.of("tickers", NAMES), "asOf", "2025-03-15"));
        assertFit(byDate.get("fit"), FEB_FIT);
        assertMatrix(NaiveCovariance.of(FEB, NAMES, 1), matrix(byDate.get("matrix")), ALGEBRAIC);
        JsonNode byId = json(given().queryParam("tickers", String.join(",", NAMES)).queryParam("fit", 10).get(PATH));
        assertFit(byId.get("fit"), FEB_FIT);
        JsonNode onDate = json(post(Map.of("tickers", NAMES), "asOf", "2025-03-31"));
        assertFit(onDate.get("fit"), MAR_FIT);
    }
}
