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
import static org.hamcrest.Matchers.hasSize;
import static org.junit.jupiter.api.Assertions.assertEquals;

class DemoLoaderTest {
    private static final String MODELS = """
            {"panel": "mini", "models": [
              {"name": "mini-short", "spec": {"panel": "mini", "windowDays": 40, "factors": {"rule": "bai-ng", "max": 5},
                                              "minCoverage": 0.9, "basis": "covariance", "refit": {"every": "PT24H"}}},
              {"name": "mini-long", "spec": {"panel": "mini", "windowDays": 80, "halfLifeDays": 30, "factors": {"rule": "fixed", "count": 2},
                                             "minCoverage": 0.9, "basis": "covariance"}}],
             "backfill": "monthly"}
            """;

    /** Requests that close their connection, so that stopping the server does not wait out idle keep-alive connections. */
    private static io.restassured.specification.RequestSpecification http() {
        return given().header("Connection", "close");
    }

    @Test
    void month_ends_are_the_last_date_of_each_month_with_a_full_window() {
        List<LocalDate> dates = List.of(LocalDate.of(2024, 1, 30), LocalDate.of(2024, 1, 31), LocalDate.of(2024, 2, 1),
                LocalDate.of(2024, 2, 29), LocalDate.of(2024, 3, 1));
        assertEquals(List.of(LocalDate.of(2024, 1, 31), LocalDate.of(2024, 2, 29), LocalDate.of(2024, 3, 1)), DemoLoader.monthEnds(dates, 1));
        assertEquals(List.of(LocalDate.of(2024, 2, 29), LocalDate.of(2024, 3, 1)), DemoLoader.monthEnds(dates, 3));
        assertEquals(List.of(), DemoLoader.monthEnds(dates, 6));
    }

    @Test
    void demo_boots_from_a_clean_data_dir_with_models_and_monthly_fits_and_a_restart_adds_nothing(@TempDir Path tmp) throws IOException {
        Path demo = Files.createDirectories(tmp.resolve("demo-data"));
        Files.writeString(demo.resolve("models.json"), MODELS);
        // 2024-01-01 .. 2024-06-14: 120 weekdays, so month ends from Feb (40 days) and Apr (80 days) have full windows.
        List<LocalDate> dates = SyntheticReturns.weekdays(LocalDate.of(2024, 1, 1), 120);
        try (OutputStream out = new GZIPOutputStream(Files.newOutputStream(demo.resolve("returns.csv.gz")))) {
            out.write(SyntheticReturns.csv(SyntheticReturns.rows(31, SyntheticReturns.tickers(12), dates)).getBytes(StandardCharsets.UTF_8));
        }
        AppConfig config = AppConfig.defaults().withPort(0).withDbUrl("jdbc:h2:file:" + tmp.resolve("data/eigencov")).withDemo(true, demo);
        try (App app = App.create(config).start()) {
            RestAssured.port = app.port();
            http().get("/v1/models").then().statusCode(200).body("models.name", contains("mini-long", "mini-short"));
            http().get("/v1/models/mini-short/fits").then().statusCode(200).body("fits.asOf",
                    contains("2024-06-14", "2024-05-31", "2024-04-30", "2024-03-29", "2024-02-29"));
            http().get("/v1/models/mini-long/fits").then().statusCode(200).body("fits", hasSize(3));
            ServedFit march = app.fitLookup().resolve("mini-short", LocalDate.of(2024, 4, 15), null);
            assertEquals(LocalDate.of(2024, 3, 29), march.ref().asOf());
            assertEquals(LocalDate.of(2024, 6, 14), app.fitLookup().resolve("mini-long", null, null).ref().asOf());
        }
        try (App again = App.create(config).start()) {
            RestAssured.port = again.port();
            http().get("/v1/models/mini-short/fits").then().statusCode(200).body("fits", hasSize(5));
            http().get("/v1/panels/mini").then().statusCode(200).body("rows", org.hamcrest.Matchers.equalTo(12 * 120));
        }
    }
}
