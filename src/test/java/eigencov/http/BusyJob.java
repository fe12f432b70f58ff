package eigencov.http;

import eigencov.service.SyntheticReturns;
import io.restassured.http.ContentType;

import java.time.LocalDate;
import java.util.List;

import static io.restassured.RestAssured.given;

/**
 * A range backfill that keeps a server's one job thread busy for a few seconds (about 200 fits of a
 * 300-name, 250-date window with the bai-ng rule), so that a job submitted behind it is still queued
 * when a test acts on it a few milliseconds later.
 */
final class BusyJob {
    private static final List<LocalDate> DATES = SyntheticReturns.weekdays(LocalDate.of(2022, 1, 3), 450);

    private BusyJob() {
    }

    /** Uploads panel {@code busy-panel} and creates model {@code busy} on the server RestAssured points at. */
    static void prepare() {
        given().contentType("text/csv").body(SyntheticReturns.csv(SyntheticReturns.rows(77, SyntheticReturns.tickers(300), DATES)))
                .post("/v1/panels/busy-panel/returns").then().statusCode(200);
        given().contentType(ContentType.JSON).body("{\"panel\": \"busy-panel\", \"windowDays\": 250, \"factors\": {\"rule\": \"bai-ng\", "
                + "\"max\": 10}, \"minCoverage\": 0.9, \"basis\": \"covariance\"}").put("/v1/models/busy").then().statusCode(201);
    }

    /** Starts the busy backfill; returns its job id. */
    static long start() {
        return given().contentType(ContentType.JSON).body("{\"from\": \"" + DATES.get(249) + "\", \"to\": \"" + DATES.get(449)
                + "\", \"every\": \"day\"}").post("/v1/models/busy/fits").then().statusCode(202).extract().jsonPath().getLong("id");
    }
}
