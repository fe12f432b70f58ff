package eigencov.http;

import eigencov.app.App;
import eigencov.app.AppConfig;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

import java.nio.file.Path;
import java.util.Random;

import static io.restassured.RestAssured.given;
import static org.hamcrest.Matchers.equalTo;
import static org.junit.jupiter.api.Assertions.assertEquals;

class RestartTest {

    @Test
    void restart_on_the_same_file_store_keeps_every_row(@TempDir Path dir) {
        AppConfig config = AppConfig.forTest("unused").withDbUrl("jdbc:h2:file:" + dir.resolve("eigencov").toAbsolutePath());
        Random rnd = new Random(20250102L);
        StringBuilder csv = new StringBuilder("date,ticker,value\n");
        int rows = 0;
        for (int d = 1; d <= 20; d++) {
            for (int t = 0; t < 25; t++) {
                csv.append(String.format("2025-01-%02d,T%02d,%s%n", d, t, rnd.nextGaussian() * 0.01));
                rows++;
            }
        }
        String before;
        try (App app = App.create(config).start()) {
            given().port(app.port()).contentType("text/csv").body(csv.toString()).post("/v1/panels/kept/returns").then()
                    .statusCode(200).body("inserted", equalTo(rows));
            before = given().port(app.port()).accept("text/csv").get("/v1/panels/kept/returns").then().extract().asString();
        }
        try (App app = App.create(config).start()) {
            given().port(app.port()).get("/v1/panels/kept").then().statusCode(200)
                    .body("rows", equalTo(rows)).body("dates", equalTo(20)).body("tickers", equalTo(25));
            String after = given().port(app.port()).accept("text/csv").get("/v1/panels/kept/returns").then().extract().asString();
            assertEquals(before, after);
        }
    }
}
