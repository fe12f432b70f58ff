package eigencov.http;

import com.fasterxml.jackson.databind.JsonNode;
import eigencov.app.App;
import eigencov.app.AppConfig;
import eigencov.math.FactorModel;
import eigencov.service.InMemoryFits;
import eigencov.service.ServedFit;
import eigencov.service.TestFits;
import io.restassured.RestAssured;
import io.restassured.http.ContentType;
import io.restassured.response.Response;
import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.LUDecomposition;
import org.apache.commons.math3.linear.RealMatrix;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;
import org.junit.jupiter.params.provider.ValueSource;

import java.time.LocalDate;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;

import static eigencov.http.QueryFixture.TOY_FIT;
import static eigencov.http.QueryFixture.json;
import static eigencov.http.QueryFixture.matrix;
import static eigencov.http.QueryFixture.strings;
import static io.restassured.RestAssured.given;
import static org.hamcrest.Matchers.containsString;
import static org.hamcrest.Matchers.equalTo;
import static org.hamcrest.Matchers.hasItem;
import static org.hamcrest.Matchers.startsWith;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * The inverse covariance and minimum-variance weights (docs/design.md section 6), answered from the
 * factor form by Woodbury (docs/methods.md section 11), checked against commons-math3's LU inverse of
 * the explicit submatrix and against the closed forms of portfolio theory.
 */
class PrecisionEndpointTest {
    /** C C^-1 = I and agreement with an LU inverse: the bound, relative to the largest entry. */
    private static final double INVERSE = 1e-9;
    /** docs/methods.md section 9 prints its check values with 6 decimals. */
    private static final double SIX_DECIMALS = 5e-7;
    /** Sums and first-order conditions of the same numbers: rounding. */
    private static final double ALGEBRAIC = 1e-10;
    static final FactorModel WIDE = TestFits.synthetic("W", 600, 5, 12L, true);
    static final ServedFit WIDE_FIT = TestFits.served(20, "wide", LocalDate.parse("2025-03-31"), WIDE, 30, List.of(), 13L);
    /** Specific floor 0 and two names without specific variance: no inverse over them. */
    static final FactorModel SINGULAR = singular();
    private static App app;

    private static FactorModel singular() {
        FactorModel m = TestFits.synthetic("S", 10, 2, 14L, false);
        double[] d = m.specificVariances();
        d[3] = 0;
        d[7] = 0;
        return new FactorModel(m.tickers(), 2, m.exposures(), m.factorCovariance(), d);
    }

    @BeforeAll
    static void start() {
        InMemoryFits fits = new InMemoryFits().add(TOY_FIT).add(WIDE_FIT)
                .add(TestFits.served(30, "singular", LocalDate.parse("2025-03-31"), SINGULAR, 30, List.of(), 15L));
        app = App.create(AppConfig.forTest("precision"), fits).start();
        RestAssured.port = app.port();
    }

    @AfterAll
    static void stop() {
        app.close();
    }

    private static List<String> names(int n) {
        List<String> out = new ArrayList<>(n);
        for (int i = 0; i < n; i++) out.add(WIDE.tickers().get((i * 7) % WIDE.size()));
        return out;
    }

    private static Response post(String model, String path, Object body, String accept) {
        return given().contentType(ContentType.JSON).accept(accept).body(body).post("/v1/models/" + model + "/" + path);
    }

    private static double[][] luInverse(double[][] c) {
        RealMatrix inv = new LUDecomposition(new Array2DRowRealMatrix(c)).getSolver().getInverse(); // commons-math3, test oracle
        return inv.getData();
    }

    @ParameterizedTest(name = "{0} names as {1}")
    @CsvSource({"5, application/json", "50, application/json", "500, application/x-npy", "50, text/csv"})
    void the_inverse_equals_commons_math_LU_on_the_explicit_submatrix_and_times_C_gives_the_identity(int n, String accept) {
        List<String> names = names(n);
        Response r = post("wide", "precision", Map.of("tickers", names), accept);
        r.then().statusCode(200).header("X-Fit-Id", "20");
        double[][] p;
        if (accept.equals("application/json")) {
            JsonNode body = json(r);
            assertEquals(names, strings(body.get("tickers")));
            assertEquals(List.of(), strings(body.get("shortHistory")));
            p = matrix(body.get("matrix"));
        } else if (accept.equals("text/csv")) {
            String[] lines = r.asString().split("\n");
            assertEquals("ticker," + String.join(",", names), lines[0]);
            p = new double[n][n];
            for (int a = 0; a < n; a++) {
                String[] cells = lines[a + 1].split(",");
                assertEquals(names.get(a), cells[0]);
                for (int b = 0; b < n; b++) p[a][b] = Double.parseDouble(cells[b + 1]);
            }
        } else {
            assertEquals(String.join(",", names), r.header("X-Tickers"));
            p = NpyReader.read(r.asByteArray());
        }
        double[][] c = NaiveCovariance.of(WIDE, names, 1);
        QueryFixture.assertMatrix(luInverse(c), p, INVERSE);
        double worst = 0;
        for (int a = 0; a < n; a++) {
            for (int b = 0; b < n; b++) {
                double s = 0;
                for (int x = 0; x < n; x++) s += c[a][x] * p[x][b];
                worst = Math.max(worst, Math.abs(s - (a == b ? 1 : 0)));
            }
        }
        assertTrue(worst <= INVERSE, "max |C C^-1 - I| = " + worst);
    }

    @Test
    void the_inverse_of_an_annual_covariance_is_the_daily_inverse_over_252() {
        List<String> names = names(20);
        double[][] daily = matrix(json(post("wide", "precision", Map.of("tickers", names), "application/json")).get("matrix"));
        JsonNode annual = json(post("wide", "precision", Map.of("tickers", names, "scale", "annual"), "application/json"));
        assertEquals(252, annual.get("scale").get("days").asInt());
        double[][] a = matrix(annual.get("matrix"));
        for (int i = 0; i < 20; i++) {
            for (int j = 0; j < 20; j++) assertEquals(daily[i][j] / 252, a[i][j], 1e-14 * Math.abs(daily[i][i]));
        }
    }

    @Test
    void minimum_variance_of_toy_model_M_matches_the_check_values_of_methods_section_9() {
        // Source: docs/methods.md section 9, "Check (Toy model M)": w_mv = (0.428215, 0.539820, 0.031966),
        // sigma_mv = 0.211609.
        JsonNode r = json(post("toy", "minimum-variance", Map.of("tickers", List.of("AAA", "BBB", "CCC")), "application/json"));
        JsonNode w = r.get("weights");
        assertEquals(0.428215, w.get("AAA").doubleValue(), SIX_DECIMALS);
        assertEquals(0.539820, w.get("BBB").doubleValue(), SIX_DECIMALS);
        assertEquals(0.031966, w.get("CCC").doubleValue(), SIX_DECIMALS);
        assertEquals(0.211609, r.get("volatility").doubleValue(), SIX_DECIMALS);
        assertEquals(1.0, r.get("budget").doubleValue(), 0);
        assertEquals(List.of("AAA", "BBB", "CCC"), strings(r.get("tickers")));
    }

    @Test
    void two_assets_get_the_textbook_closed_form() {
        // Two-asset minimum variance (e.g. Bodie, Kane and Marcus, Investments, the minimum-variance portfolio; from
        // memory): w_1 = (s2^2 - s12) / (s1^2 + s2^2 - 2 s12), variance (s1^2 s2^2 - s12^2) / (s1^2 + s2^2 - 2 s12).
        // Toy model M (docs/methods.md section 0): s1^2 = .0625, s2^2 = .0565, s12 = .0305.
        double s11 = .0625;
        double s22 = .0565;
        double s12 = .0305;
        double den = s11 + s22 - 2 * s12;
        JsonNode r = json(post("toy", "minimum-variance", Map.of("tickers", List.of("AAA", "BBB"), "budget", 2.5, "horizonDays", 21),
                "application/json"));
        assertEquals(2.5 * (s22 - s12) / den, r.get("weights").get("AAA").doubleValue(), 1e-12);
        assertEquals(2.5 * (s11 - s12) / den, r.get("weights").get("BBB").doubleValue(), 1e-12);
        double variance = 2.5 * 2.5 * (s11 * s22 - s12 * s12) / den;
        assertEquals(Math.sqrt(21 * variance), r.get("volatility").doubleValue(), 1e-12);
        assertEquals(21, r.get("scale").get("days").asInt());
    }

    @ParameterizedTest(name = "{0} names")
    @ValueSource(ints = {5, 50, 600})
    void weights_sum_to_the_budget_and_every_name_has_the_same_marginal_variance(int n) {
        // First-order condition of min w'Cw subject to 1'w = b (Lagrange): C w = mu 1 with mu = w'Cw / b.
        List<String> names = names(n);
        double budget = -0.75;
        JsonNode r = json(post("wide", "minimum-variance", Map.of("tickers", names, "budget", budget), "application/json"));
        double[] w = new double[n];
        double sum = 0;
        for (int i = 0; i < n; i++) {
            w[i] = r.get("weights").get(names.get(i)).doubleValue();
            sum += w[i];
        }
        assertEquals(budget, sum, ALGEBRAIC);
        double[][] c = NaiveCovariance.of(WIDE, names, 1);
        double wcw = 0;
        double[] cw = new double[n];
        for (int i = 0; i < n; i++) {
            for (int j = 0; j < n; j++) cw[i] += c[i][j] * w[j];
            wcw += w[i] * cw[i];
        }
        double mu = wcw / budget;
        for (int i = 0; i < n; i++) assertEquals(mu, cw[i], ALGEBRAIC * Math.abs(mu), "(C w)_" + i);
        assertEquals(Math.sqrt(wcw), r.get("volatility").doubleValue(), ALGEBRAIC * Math.sqrt(wcw));
    }

    @Test
    void missing_omit_answers_on_the_covered_tickers_and_asOf_selects_the_fit() {
        JsonNode r = json(given().contentType(ContentType.JSON).queryParam("missing", "omit").queryParam("asOf", "2025-06-30")
                .body(Map.of("tickers", List.of("NOPE", "AAA", "CCC"))).post("/v1/models/toy/minimum-variance").then().statusCode(200)
                .extract().response());
        assertEquals(List.of("AAA", "CCC"), strings(r.get("tickers")));
        assertEquals(List.of("NOPE"), strings(r.get("omitted")));
        given().contentType(ContentType.JSON).body(Map.of("tickers", List.of("NOPE", "AAA"))).post("/v1/models/toy/precision").then()
                .statusCode(422).contentType(startsWith(Problem.CONTENT_TYPE)).body("errors.field", hasItem("tickers[0]"));
        given().contentType(ContentType.JSON).queryParam("asOf", "2024-01-01").body(Map.of("tickers", List.of("AAA")))
                .post("/v1/models/toy/precision").then().statusCode(404);
    }

    @ParameterizedTest(name = "{0} {1}")
    @CsvSource(delimiter = '|', value = {
            "precision|{\"tickers\": [\"AAA\"], \"form\": \"matrix\"}|form",
            "minimum-variance|{\"tickers\": [\"AAA\"], \"weights\": {}}|weights",
            "precision|{\"tickers\": []}|tickers",
            "minimum-variance|{\"tickers\": []}|tickers",
            "precision|{\"tickers\": [\"AAA\", \"BBB\", \"AAA\"]}|tickers[2]",
            "minimum-variance|{\"tickers\": [\"AAA\", \"AAA\"]}|tickers[1]",
            "minimum-variance|{\"tickers\": [\"AAA\", \"BBB\"], \"budget\": 0}|budget",
            "minimum-variance|{\"tickers\": [\"AAA\", \"BBB\"], \"budget\": 1e400}|budget",
            "minimum-variance|{\"tickers\": [\"AAA\", \"BBB\"], \"budget\": \"1\"}|budget",
            "precision|{\"tickers\": [\"AAA\"], \"scale\": \"annual\", \"horizonDays\": 5}|scale",
            "precision|{\"tickers\": [\"AAA\"], \"horizonDays\": 0}|horizonDays",
            "minimum-variance|{\"budget\": 1}|tickers",
    })
    void bad_requests_are_400_problems_naming_the_field(String path, String body, String field) {
        given().contentType(ContentType.JSON).body(body).post("/v1/models/toy/" + path).then()
                .statusCode(400).contentType(startsWith(Problem.CONTENT_TYPE))
                .body("errors.field", hasItem(field));
    }

    @Test
    void more_than_3000_names_for_the_inverse_is_a_400_naming_tickers() {
        List<String> many = new ArrayList<>();
        for (int i = 0; i < 3001; i++) many.add("N" + i);
        given().contentType(ContentType.JSON).body(Map.of("tickers", many)).post("/v1/models/wide/precision").then()
                .statusCode(400).body("errors[0].field", equalTo("tickers")).body("detail", containsString("3000"));
    }

    @ParameterizedTest
    @ValueSource(strings = {"precision", "minimum-variance"})
    void names_without_specific_variance_under_a_zero_floor_are_a_422_naming_them(String path) {
        List<String> t = SINGULAR.tickers();
        given().contentType(ContentType.JSON).body(Map.of("tickers", List.of(t.get(1), t.get(7), t.get(2), t.get(3))))
                .post("/v1/models/singular/" + path).then()
                .statusCode(422).contentType(startsWith(Problem.CONTENT_TYPE))
                .body("type", equalTo("/problems/singular-covariance"))
                .body("errors.field", equalTo(List.of("tickers[1]", "tickers[3]")))
                .body("errors[0].message", containsString(t.get(7)))
                .body("errors[1].message", containsString(t.get(3)));
        // without them the inverse exists
        given().contentType(ContentType.JSON).body(Map.of("tickers", List.of(t.get(1), t.get(2))))
                .post("/v1/models/singular/" + path).then().statusCode(200);
    }

    @Test
    void minimum_variance_is_JSON_only() {
        post("toy", "minimum-variance", Map.of("tickers", List.of("AAA")), "text/csv").then().statusCode(406);
    }
}
