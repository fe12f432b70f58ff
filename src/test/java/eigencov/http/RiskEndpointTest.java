package eigencov.http;

import com.fasterxml.jackson.databind.JsonNode;
import eigencov.app.App;
import io.restassured.RestAssured;
import io.restassured.http.ContentType;
import io.restassured.response.Response;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

import static eigencov.http.QueryFixture.MAR;
import static eigencov.http.QueryFixture.TOY_FIT;
import static eigencov.http.QueryFixture.assertFit;
import static eigencov.http.QueryFixture.json;
import static eigencov.http.QueryFixture.strings;
import static io.restassured.RestAssured.given;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;

class RiskEndpointTest {
    /** docs/methods.md section 9 states its check values to 6 decimals. */
    private static final double SIX_DECIMALS = 5e-7;
    /** Sums and square roots of the same quantities: agreement to rounding. */
    private static final double ALGEBRAIC = 1e-12;
    private static App app;

    @BeforeAll
    static void start() {
        app = QueryFixture.start("risk");
        RestAssured.port = app.port();
    }

    @AfterAll
    static void stop() {
        app.close();
    }

    private static JsonNode risk(String model, Object body, String... query) {
        var req = given().contentType(ContentType.JSON).body(body);
        for (int i = 0; i < query.length; i += 2) req = req.queryParam(query[i], query[i + 1]);
        Response r = req.post("/v1/models/" + model + "/risk");
        r.then().statusCode(200).contentType(ContentType.JSON);
        return json(r);
    }

    private static Map<String, Double> weights(Object... pairs) {
        Map<String, Double> w = new LinkedHashMap<>();
        for (int i = 0; i < pairs.length; i += 2) w.put((String) pairs[i], ((Number) pairs[i + 1]).doubleValue());
        return w;
    }

    @Test
    void toy_model_M_risk_matches_the_check_values_of_methods_section_9() {
        // Source: docs/methods.md section 9, "Check (Toy model M)": w = (0.5, 0.3, 0.2), benchmark equal weight.
        JsonNode r = risk("toy", Map.of("weights", weights("AAA", 0.5, "BBB", 0.3, "CCC", 0.2),
                "benchmark", weights("AAA", 1 / 3.0, "BBB", 1 / 3.0, "CCC", 1 / 3.0)));
        assertFit(r.get("fit"), TOY_FIT);
        assertEquals(0.220091, r.get("volatility").doubleValue(), SIX_DECIMALS);
        assertEquals(0.04844, r.get("variance").doubleValue(), SIX_DECIMALS);
        assertEquals(0.03874, r.get("factorVariance").doubleValue(), SIX_DECIMALS);
        assertEquals(0.0097, r.get("specificVariance").doubleValue(), SIX_DECIMALS);
        assertEquals(0.039469, r.get("trackingError").doubleValue(), SIX_DECIMALS);
        double[] x = {0.98, 0.18};
        double[] byFactor = {0.174546, 0.001472};
        for (int j = 0; j < 2; j++) {
            JsonNode f = r.get("byFactor").get(j);
            assertEquals(j + 1, f.get("factor").asInt());
            assertEquals(x[j], f.get("exposure").doubleValue(), SIX_DECIMALS);
            assertEquals(byFactor[j], f.get("contribution").doubleValue(), SIX_DECIMALS);
        }
        double[] mcr = {0.227633, 0.180925, 0.259984};
        double[] ccr = {0.113817, 0.054278, 0.051997};
        double[] specific = {0.022718, 0.012268, 0.009087};
        List<String> tickers = List.of("AAA", "BBB", "CCC");
        for (int i = 0; i < 3; i++) {
            JsonNode a = r.get("byAsset").get(i);
            assertEquals(tickers.get(i), a.get("ticker").asText());
            assertEquals(mcr[i], a.get("marginal").doubleValue(), SIX_DECIMALS);
            assertEquals(ccr[i], a.get("contribution").doubleValue(), SIX_DECIMALS);
            assertEquals(specific[i], a.get("specificContribution").doubleValue(), SIX_DECIMALS);
        }
        assertEquals(0.022718 + 0.012268 + 0.009087, r.get("specificContribution").doubleValue(), 3 * SIX_DECIMALS);
    }

    @Test
    void risk_without_benchmark_has_no_tracking_error_or_active_part() {
        JsonNode r = risk("toy", Map.of("weights", weights("AAA", 0.5, "BBB", 0.3, "CCC", 0.2)));
        assertFalse(r.has("trackingError"));
        assertFalse(r.has("active"));
    }

    @Test
    void variance_equals_w_C_w_by_the_naive_covariance_and_contributions_sum_to_volatility() {
        Map<String, Double> w = weights("T0005", 0.4, "T0011", -0.25, "T0020", 0.6, "T0033", 0.25);
        List<String> names = List.copyOf(w.keySet());
        JsonNode r = risk("synth", Map.of("weights", w, "scale", "annual"));
        double[][] c = NaiveCovariance.of(MAR, names, 252);
        double v = 0;
        for (int i = 0; i < names.size(); i++) {
            for (int j = 0; j < names.size(); j++) v += w.get(names.get(i)) * c[i][j] * w.get(names.get(j));
        }
        assertEquals(v, r.get("variance").doubleValue(), ALGEBRAIC * v);
        double vol = r.get("volatility").doubleValue();
        assertEquals(Math.sqrt(v), vol, ALGEBRAIC * vol);
        assertEquals(v, r.get("factorVariance").doubleValue() + r.get("specificVariance").doubleValue(), ALGEBRAIC * v);
        double byAsset = 0;
        double byFactor = 0;
        for (JsonNode a : r.get("byAsset")) {
            byAsset += a.get("contribution").doubleValue();
            // marginal = (C w)_i / vol, by the naive matrix
            int i = names.indexOf(a.get("ticker").asText());
            double cw = 0;
            for (int j = 0; j < names.size(); j++) cw += c[i][j] * w.get(names.get(j));
            assertEquals(cw / vol, a.get("marginal").doubleValue(), ALGEBRAIC * vol);
        }
        for (JsonNode f : r.get("byFactor")) byFactor += f.get("contribution").doubleValue();
        assertEquals(vol, byAsset, ALGEBRAIC * vol);
        assertEquals(vol, byFactor + r.get("specificContribution").doubleValue(), ALGEBRAIC * vol);
        assertEquals(252, r.get("scale").get("days").asInt());
    }

    @Test
    void active_risk_decomposes_the_tracking_error_over_portfolio_and_benchmark_names() {
        Map<String, Double> w = weights("T0005", 0.5, "T0011", 0.3, "T0020", 0.2);
        Map<String, Double> bench = weights("T0011", 0.4, "T0033", 0.6);
        JsonNode r = risk("synth", Map.of("weights", w, "benchmark", bench));
        JsonNode act = r.get("active");
        List<String> union = List.of("T0005", "T0011", "T0020", "T0033");
        double[] a = {0.5, 0.3 - 0.4, 0.2, -0.6};
        double[][] c = NaiveCovariance.of(MAR, union, 1);
        double te2 = 0;
        for (int i = 0; i < 4; i++) for (int j = 0; j < 4; j++) te2 += a[i] * c[i][j] * a[j];
        double te = Math.sqrt(te2);
        assertEquals(te, r.get("trackingError").doubleValue(), ALGEBRAIC * te);
        assertEquals(te, act.get("trackingError").doubleValue(), ALGEBRAIC * te);
        double sum = 0;
        for (int i = 0; i < 4; i++) {
            JsonNode row = act.get("byAsset").get(i);
            assertEquals(union.get(i), row.get("ticker").asText());
            assertEquals(a[i], row.get("activeWeight").doubleValue(), 1e-15);
            double ca = 0;
            for (int j = 0; j < 4; j++) ca += c[i][j] * a[j];
            assertEquals(a[i] * ca / te, row.get("contribution").doubleValue(), ALGEBRAIC * te);
            sum += row.get("contribution").doubleValue();
        }
        assertEquals(te, sum, ALGEBRAIC * te);
        double byFactor = act.get("specificContribution").doubleValue();
        for (JsonNode f : act.get("byFactor")) byFactor += f.get("contribution").doubleValue();
        assertEquals(te, byFactor, ALGEBRAIC * te);
    }

    @Test
    void missing_omit_drops_uncovered_weights_and_benchmark_names_and_lists_them() {
        JsonNode r = risk("synth", Map.of("weights", weights("T0001", 0.5, "ZZZ", 0.2, "T0002", 0.3),
                "benchmark", weights("T0001", 0.5, "GONE", 0.5)), "missing", "omit");
        assertEquals(List.of("ZZZ", "GONE"), strings(r.get("omitted")));
        assertEquals(2, r.get("byAsset").size());
        JsonNode same = risk("synth", Map.of("weights", weights("T0001", 0.5, "T0002", 0.3), "benchmark", weights("T0001", 0.5)));
        assertEquals(same.get("volatility").doubleValue(), r.get("volatility").doubleValue(), 0.0);
        assertEquals(same.get("trackingError").doubleValue(), r.get("trackingError").doubleValue(), 0.0);
    }

    @Test
    void missing_error_names_the_uncovered_weight_and_benchmark_tickers() {
        Response r = given().contentType(ContentType.JSON).body(Map.of("weights", weights("T0001", 0.5, "ZZZ", 0.5),
                "benchmark", weights("GONE", 1.0))).post("/v1/models/synth/risk");
        r.then().statusCode(422).contentType(Problem.CONTENT_TYPE);
        JsonNode p = json(r);
        assertEquals("/problems/unknown-tickers", p.get("type").asText());
        assertEquals("weights.ZZZ", p.get("errors").get(0).get("field").asText());
        assertEquals("benchmark.GONE", p.get("errors").get(1).get("field").asText());
    }

    @Test
    void betas_are_C_p_over_p_C_p_for_the_first_factors_portfolio_whose_own_beta_is_one() {
        // docs/design.md section 6: p = e_1 scaled to sum 1 (covariance basis), beta = C p / (p'C p); checked with the
        // explicit matrix of the definition (NaiveCovariance), names chosen as the whole synthetic universe
        List<String> names = MAR.tickers();
        int n = names.size();
        double[] p = new double[n];
        double sum = 0;
        for (int i = 0; i < n; i++) sum += MAR.exposure(i, 0);
        Map<String, Double> w = new LinkedHashMap<>();
        for (int i = 0; i < n; i++) {
            p[i] = MAR.exposure(i, 0) / sum;
            w.put(names.get(i), p[i]);
        }
        JsonNode r = risk("synth", Map.of("weights", w, "scale", "annual"));
        assertEquals(1.0, r.get("beta").doubleValue(), ALGEBRAIC, "p'beta = 1, whatever the scale");
        double[][] c = NaiveCovariance.of(MAR, names, 1);
        double pcp = 0;
        double[] cp = new double[n];
        for (int i = 0; i < n; i++) {
            for (int j = 0; j < n; j++) cp[i] += c[i][j] * p[j];
            pcp += p[i] * cp[i];
        }
        for (int i = 0; i < n; i++) {
            JsonNode a = r.get("byAsset").get(i);
            assertEquals(names.get(i), a.get("ticker").asText());
            assertEquals(cp[i] / pcp, a.get("beta").doubleValue(), ALGEBRAIC * Math.abs(cp[i] / pcp) + 1e-15, names.get(i));
        }
        // a smaller portfolio: its beta is w'beta of the same per-name betas
        JsonNode small = risk("synth", Map.of("weights", weights("T0003", 0.6, "T0009", 0.4)));
        double expected = 0.6 * cp[3] / pcp + 0.4 * cp[9] / pcp;
        assertEquals(expected, small.get("beta").doubleValue(), ALGEBRAIC * Math.abs(expected));
        assertFalse(small.has("betaToFirstFactor"), "the old field is gone");
    }
}
