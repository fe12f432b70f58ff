package eigencov.http;

import com.fasterxml.jackson.databind.JsonNode;
import eigencov.app.App;
import eigencov.math.FitResult;
import io.restassured.RestAssured;
import io.restassured.http.ContentType;
import io.restassured.response.Response;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

import java.time.LocalDate;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;

import static eigencov.http.QueryFixture.FEB_FIT;
import static eigencov.http.QueryFixture.MAR;
import static eigencov.http.QueryFixture.MAR_FIT;
import static eigencov.http.QueryFixture.assertFit;
import static eigencov.http.QueryFixture.json;
import static eigencov.http.QueryFixture.matrix;
import static eigencov.http.QueryFixture.strings;
import static io.restassured.RestAssured.given;
import static org.junit.jupiter.api.Assertions.assertEquals;

/** Exposures, factors and factor returns: values passed through from the served fit, in every format. */
class FactorEndpointsTest {
    private static final List<String> NAMES = List.of("T0039", "T0002", "T0017");
    private static App app;

    @BeforeAll
    static void start() {
        app = QueryFixture.start("factors");
        RestAssured.port = app.port();
    }

    @AfterAll
    static void stop() {
        app.close();
    }

    private static void assertExposureRows(double[][] rows, boolean withSpecific) {
        int k = MAR.factors();
        assertEquals(NAMES.size(), rows.length);
        for (int r = 0; r < rows.length; r++) {
            int i = MAR.indexOf(NAMES.get(r));
            assertEquals(withSpecific ? k + 1 : k, rows[r].length);
            for (int a = 0; a < k; a++) assertEquals(MAR.exposure(i, a), rows[r][a], 0.0);
            if (withSpecific) assertEquals(MAR.specificVariance(i), rows[r][k], 0.0);
        }
    }

    @Test
    void POST_exposures_gives_k_exposures_and_the_specific_variance_per_ticker() {
        Response r = given().contentType(ContentType.JSON).body(Map.of("tickers", NAMES)).post("/v1/models/synth/exposures");
        r.then().statusCode(200).header("X-Fit-Id", "11");
        JsonNode body = json(r);
        assertFit(body.get("fit"), MAR_FIT);
        assertEquals(MAR.factors(), body.get("factors").asInt());
        assertEquals(NAMES, strings(body.get("tickers")));
        assertExposureRows(matrix(body.get("exposures")), false);
        for (int r2 = 0; r2 < NAMES.size(); r2++) {
            assertEquals(MAR.specificVariance(MAR.indexOf(NAMES.get(r2))), body.get("specificVariance").get(r2).doubleValue(), 0.0);
        }
    }

    @Test
    void exposures_as_npy_put_the_specific_variance_in_the_last_column() {
        Response r = given().accept("application/x-npy").queryParam("tickers", String.join(",", NAMES)).get("/v1/models/synth/exposures");
        r.then().statusCode(200).header("X-Tickers", String.join(",", NAMES)).header("X-Columns", "f1,f2,f3,specificVariance");
        assertEquals("application/x-npy", r.header("Content-Type"));
        assertExposureRows(NpyReader.read(r.asByteArray()), true);
    }

    @Test
    void exposures_as_csv_have_ticker_factor_and_specific_columns() {
        Response r = given().accept("text/csv").queryParam("tickers", String.join(",", NAMES)).get("/v1/models/synth/exposures");
        String[] lines = r.then().statusCode(200).extract().asString().split("\n");
        assertEquals("ticker,f1,f2,f3,specificVariance", lines[0]);
        double[][] rows = new double[NAMES.size()][];
        for (int i = 0; i < rows.length; i++) {
            String[] cells = lines[i + 1].split(",");
            assertEquals(NAMES.get(i), cells[0]);
            rows[i] = java.util.Arrays.stream(cells, 1, cells.length).mapToDouble(Double::parseDouble).toArray();
        }
        assertExposureRows(rows, true);
    }

    @Test
    void factors_give_factor_covariance_and_the_spectrum_with_variance_shares() {
        JsonNode body = json(given().get("/v1/models/synth/factors").then().statusCode(200).extract().response());
        assertFit(body.get("fit"), MAR_FIT);
        int k = body.get("factors").asInt();
        assertEquals(3, k);
        double[][] f = matrix(body.get("factorCovariance"));
        for (int a = 0; a < k; a++) for (int b = 0; b < k; b++) assertEquals(MAR.factorCov(a, b), f[a][b], 0.0);
        FitResult r = MAR_FIT.result();
        double explained = 0;
        for (int j = 0; j < r.eigenvalues().length; j++) {
            assertEquals(r.eigenvalues()[j], body.get("eigenvalues").get(j).doubleValue(), 0.0);
            assertEquals(r.varianceShare()[j], body.get("varianceShare").get(j).doubleValue(), 0.0);
            if (j < k) explained += r.varianceShare()[j];
        }
        assertEquals(explained, body.get("explainedShare").doubleValue(), 1e-15);
        assertFit(json(given().queryParam("fit", 10).get("/v1/models/synth/factors")).get("fit"), FEB_FIT);
    }

    /** Rows of the served factor returns dated within [from, to]. */
    private static double[][] expectedReturns(LocalDate from, LocalDate to, List<String> datesOut) {
        FitResult r = MAR_FIT.result();
        int k = r.model().factors();
        double[] all = r.factorReturns();
        List<double[]> rows = new ArrayList<>();
        for (int t = 0; t < r.dates().size(); t++) {
            LocalDate d = r.dates().get(t);
            if (d.isBefore(from) || d.isAfter(to)) continue;
            datesOut.add(d.toString());
            rows.add(java.util.Arrays.copyOfRange(all, t * k, t * k + k));
        }
        return rows.toArray(new double[0][]);
    }

    @Test
    void factor_returns_between_two_dates_in_json_csv_and_npy() {
        LocalDate from = LocalDate.parse("2025-03-10");
        LocalDate to = LocalDate.parse("2025-03-20");
        List<String> dates = new ArrayList<>();
        double[][] expected = expectedReturns(from, to, dates);
        assertEquals(9, dates.size(), "weekdays 10..20 March 2025");
        String path = "/v1/models/synth/factor-returns";

        JsonNode body = json(given().queryParam("from", from.toString()).queryParam("to", to.toString()).get(path));
        assertEquals(dates, strings(body.get("dates")));
        QueryFixture.assertMatrix(expected, matrix(body.get("factorReturns")), 0.0);

        String[] lines = given().accept("text/csv").queryParam("from", from.toString()).queryParam("to", to.toString()).get(path)
                .then().statusCode(200).extract().asString().split("\n");
        assertEquals("date,f1,f2,f3", lines[0]);
        assertEquals(dates.size() + 1, lines.length);
        assertEquals(dates.get(0), lines[1].split(",")[0]);
        assertEquals(expected[0][2], Double.parseDouble(lines[1].split(",")[3]), 0.0);

        Response npy = given().accept("application/x-npy").queryParam("from", from.toString()).queryParam("to", to.toString()).get(path);
        npy.then().statusCode(200).header("X-Dates", String.join(",", dates));
        assertEquals("application/x-npy", npy.header("Content-Type"));
        QueryFixture.assertMatrix(expected, NpyReader.read(npy.asByteArray()), 0.0);
    }

    @Test
    void factor_returns_default_to_the_whole_window_and_are_empty_outside_it() {
        JsonNode all = json(given().get("/v1/models/synth/factor-returns"));
        assertEquals(MAR_FIT.result().dates().size(), all.get("dates").size());
        JsonNode none = json(given().queryParam("from", "2030-01-01").get("/v1/models/synth/factor-returns").then().statusCode(200).extract().response());
        assertEquals(0, none.get("dates").size());
        assertEquals(0, none.get("factorReturns").size());
    }
}
