package eigencov.http;

import com.fasterxml.jackson.databind.JsonNode;
import eigencov.app.App;
import eigencov.app.AppConfig;
import eigencov.math.FactorFitter;
import eigencov.math.FactorModel;
import eigencov.math.FactorRule;
import eigencov.math.FitOptions;
import eigencov.math.FitResult;
import eigencov.math.ReturnPanel;
import eigencov.service.FitRef;
import eigencov.service.InMemoryFits;
import eigencov.service.ServedFit;
import io.restassured.RestAssured;
import io.restassured.http.ContentType;
import io.restassured.response.Response;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

import java.time.Instant;
import java.time.LocalDate;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.Random;

import static eigencov.http.QueryFixture.json;
import static eigencov.http.QueryFixture.matrix;
import static io.restassured.RestAssured.given;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * A real fit served end to end: the engine fits a seeded two-factor panel, and the covariance the
 * endpoint answers is checked against the sample covariance computed here from the raw returns
 * (docs/design.md section 3: the model diagonal equals S_ii wherever the specific floor is inactive).
 */
class FittedModelQueryTest {
    /** After an eigen-decomposition: about 1e-8 relative to the largest variance (style practice 12). */
    private static final double AFTER_DECOMPOSITION = 1e-8;
    private static final int T = 160;
    private static final int K = 25;
    private static ReturnPanel panel;
    private static FactorModel model;
    private static App app;

    @BeforeAll
    static void start() {
        Random rnd = new Random(11L);
        List<LocalDate> dates = new ArrayList<>();
        for (int t = 0; t < T; t++) dates.add(LocalDate.parse("2024-01-01").plusDays(t));
        List<String> tickers = new ArrayList<>();
        for (int i = 0; i < K; i++) tickers.add("P" + i);
        tickers.add("SPARSE");
        int cols = K + 1;
        double[] x = new double[T * cols];
        double[][] load = new double[cols][2];
        for (double[] l : load) {
            l[0] = 0.8 + 0.4 * rnd.nextDouble();
            l[1] = rnd.nextGaussian();
        }
        for (int t = 0; t < T; t++) {
            double f1 = 0.01 * rnd.nextGaussian();
            double f2 = 0.005 * rnd.nextGaussian();
            for (int i = 0; i < cols; i++) {
                x[t * cols + i] = load[i][0] * f1 + load[i][1] * f2 + 0.008 * rnd.nextGaussian();
            }
            if (t % 3 == 0) x[t * cols + K] = Double.NaN; // SPARSE: a third missing, below 90 % coverage
        }
        panel = new ReturnPanel(dates, tickers, x);
        FitResult fit = new FactorFitter(null).fit(panel, FitOptions.of(new FactorRule.Fixed(2), 0.9), null);
        model = fit.model();
        ServedFit served = new ServedFit(new FitRef(5, "real", dates.get(T - 1), Instant.parse("2024-06-09T18:00:00Z")), fit);
        app = App.create(AppConfig.forTest("fitted"), new InMemoryFits().add(served)).start();
        RestAssured.port = app.port();
    }

    @AfterAll
    static void stop() {
        app.close();
    }

    /** Sample variance of column i with divisor T (docs/design.md section 3, equal weights). */
    private static double sampleVariance(int i) {
        int cols = panel.tickers().size();
        double mean = 0;
        for (int t = 0; t < T; t++) mean += panel.values()[t * cols + i];
        mean /= T;
        double s = 0;
        for (int t = 0; t < T; t++) {
            double d = panel.values()[t * cols + i] - mean;
            s += d * d;
        }
        return s / T;
    }

    @Test
    void covariance_diagonal_of_a_real_fit_equals_the_sample_variance_where_the_floor_is_inactive() {
        List<String> names = model.tickers();
        assertEquals(K, names.size(), "SPARSE is left out of the universe");
        Response r = given().contentType(ContentType.JSON).body(Map.of("tickers", names)).post("/v1/models/real/covariance");
        double[][] c = matrix(json(r.then().statusCode(200).extract().response()).get("matrix"));
        double maxVar = 0;
        for (int i = 0; i < K; i++) maxVar = Math.max(maxVar, sampleVariance(i));
        int checked = 0;
        for (int r2 = 0; r2 < names.size(); r2++) {
            int col = panel.tickers().indexOf(names.get(r2));
            double s = sampleVariance(col);
            if (model.specificVariance(r2) > FitOptions.DEFAULT_SPECIFIC_FLOOR * s * (1 + 1e-6)) {
                assertEquals(s, c[r2][r2], AFTER_DECOMPOSITION * maxVar, names.get(r2));
                checked++;
            }
        }
        assertTrue(checked > K / 2, "floor inactive for most names, checked " + checked);
    }

    @Test
    void a_ticker_the_fitter_excluded_for_coverage_is_reported_with_its_counts() {
        Response r = given().queryParam("tickers", "P0,SPARSE").get("/v1/models/real/covariance");
        r.then().statusCode(422);
        JsonNode e = json(r).get("errors").get(0);
        assertEquals("tickers[1]", e.get("field").asText());
        assertTrue(e.get("message").asText().contains("excluded from the fit (coverage: 106 observations, 144 required)"), e.toString());
    }
}
