package eigencov.app;

import eigencov.service.ServedFit;
import eigencov.service.SyntheticReturns;
import io.restassured.RestAssured;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

import java.io.IOException;
import java.io.OutputStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.LocalDate;
import java.util.List;
import java.util.zip.GZIPOutputStream;

import static io.restassured.RestAssured.given;
import static org.hamcrest.Matchers.contains;
import static org.hamcrest.Matchers.equalTo;
import static org.hamcrest.Matchers.everyItem;
import static org.hamcrest.Matchers.hasSize;
import static org.junit.jupiter.api.Assertions.assertEquals;

class DemoLoaderTest {
    private static final String MODELS = """
            {"panel": "mini", "models": [
              {"name": "mini-short", "spec": {"panel": "mini", "windowDays": 40, "factors": {"rule": "bai-ng", "max": 5},
                                              "minCoverage": 0.9, "basis": "covariance", "refit": {"every": "PT24H"}}},
              {"name": "mini-long", "spec": {"panel": "mini", "windowDays": 80, "halfLifeDays": 30, "factors": {"rule": "fixed", "count": 2},
                                             "minCoverage": 0.9, "basis": "covariance"}}],
             "backfill": "monthly",
             "evaluation": {"lookbackDays": 365, "every": "week", "horizonDays": 5, "random": {"count": 5, "names": 4, "seed": 3},
                            "baselines": ["sample", "ledoit-wolf"]}}
            """;

    /** Requests that close their connection, so that stopping the server does not wait out idle keep-alive connections. */
    private static io.restassured.specification.RequestSpecification http() {
        return given().header("Connection", "close");
    }

    @Test
    void demo_boots_from_a_clean_data_dir_with_models_monthly_fits_and_an_evaluation_and_a_restart_adds_nothing(@TempDir Path tmp)
            throws IOException {
        Path demo = Files.createDirectories(tmp.resolve("demo-data"));
        Files.writeString(demo.resolve("models.json"), MODELS);
        // 2024-01-01 .. 2024-06-14: 120 weekdays, so month ends from Feb (40 days) and Apr (80 days) have full windows.
        List<LocalDate> dates = SyntheticReturns.weekdays(LocalDate.of(2024, 1, 1), 120);
        try (OutputStream out = new GZIPOutputStream(Files.newOutputStream(demo.resolve("returns.csv.gz")))) {
            out.write(SyntheticReturns.csv(SyntheticReturns.rows(31, SyntheticReturns.tickers(12), dates)).getBytes(StandardCharsets.UTF_8));
        }
        int fitsBefore;
        AppConfig config = AppConfig.defaults().withPort(0).withDbUrl("jdbc:h2:file:" + tmp.resolve("data/eigencov")).withDemo(true, demo);
        try (App app = App.create(config).start()) {
            RestAssured.port = app.port();
            http().get("/v1/models").then().statusCode(200).body("models.name", contains("mini-long", "mini-short"));
            http().get("/v1/models/mini-short/fits").then().statusCode(200).body("fits.findAll { it.origin == 'backfill' }.asOf",
                    contains("2024-06-14", "2024-05-31", "2024-04-30", "2024-03-29", "2024-02-29"));
            http().get("/v1/models/mini-long/fits").then().statusCode(200).body("fits.findAll { it.origin == 'backfill' }", hasSize(3));
            // two backfill jobs and the evaluation, all done; the evaluation scores both models and both baselines of each
            http().get("/v1/jobs").then().statusCode(200).body("jobs.kind", contains("evaluation", "backfill", "backfill"))
                    .body("jobs.state", everyItem(equalTo("done")));
            http().get("/v1/evaluations").then().statusCode(200).body("evaluations", hasSize(1));
            int id = http().get("/v1/evaluations").then().extract().path("evaluations[0].id");
            // from the first date with an 80-day window (2024-04-19, a Friday) weekly to 2024-06-14, which has no 5 later dates
            http().get("/v1/evaluations/" + id).then().statusCode(200).body("state", equalTo("done"))
                    .body("request.models", contains("mini-short", "mini-long"))
                    .body("dates[0]", equalTo("2024-04-19")).body("dates", hasSize(8))
                    .body("dropped.date", contains("2024-06-14"))
                    .body("results.model", contains("mini-short", "mini-short", "mini-short", "mini-long", "mini-long", "mini-long"))
                    .body("results.baseline", contains(null, "sample", "ledoit-wolf", null, "sample", "ledoit-wolf"));
            ServedFit march = app.fitLookup().resolve("mini-short", LocalDate.of(2024, 4, 15), null);
            assertEquals(LocalDate.of(2024, 3, 29), march.ref().asOf());
            assertEquals(LocalDate.of(2024, 6, 14), app.fitLookup().resolve("mini-long", null, null).ref().asOf());
            fitsBefore = http().get("/v1/models/mini-short/fits").then().extract().path("fits.size()");
        }
        try (App again = App.create(config).start()) {
            RestAssured.port = again.port();
            http().get("/v1/models/mini-short/fits").then().statusCode(200).body("fits", hasSize(fitsBefore));
            http().get("/v1/jobs").then().statusCode(200).body("jobs", hasSize(3));
            http().get("/v1/panels/mini").then().statusCode(200).body("rows", org.hamcrest.Matchers.equalTo(12 * 120));
        }
    }
}
