package eigencov.http;

import eigencov.app.App;
import eigencov.app.AppConfig;
import eigencov.service.JobView;
import eigencov.service.SyntheticReturns;
import io.restassured.http.ContentType;
import org.junit.jupiter.api.Test;

import java.time.Duration;
import java.time.LocalDate;
import java.util.List;
import java.util.Map;

import static io.restassured.RestAssured.given;
import static org.hamcrest.Matchers.equalTo;
import static org.hamcrest.Matchers.hasSize;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

class JobRestartTest {

    @Test
    void a_job_cut_off_by_a_stop_is_finished_by_the_next_start_without_fitting_any_date_twice() throws InterruptedException {
        // forTest's store outlives an App in this JVM (in-memory H2 kept open, or a PostgreSQL schema): a restart
        AppConfig config = AppConfig.forTest("job-restart");
        List<LocalDate> dates = SyntheticReturns.weekdays(LocalDate.of(2024, 1, 1), 400);
        int total = 400 - 39;
        long id;
        try (App first = App.create(config).start()) {
            given().port(first.port()).contentType("text/csv")
                    .body(SyntheticReturns.csv(SyntheticReturns.rows(51, SyntheticReturns.tickers(12), dates)))
                    .post("/v1/panels/rp/returns").then().statusCode(200);
            given().port(first.port()).contentType(ContentType.JSON).body("{\"panel\": \"rp\", \"windowDays\": 40, "
                    + "\"factors\": {\"rule\": \"fixed\", \"count\": 2}, \"minCoverage\": 0.9, \"basis\": \"covariance\"}")
                    .put("/v1/models/rm").then().statusCode(201);
            id = given().port(first.port()).contentType(ContentType.JSON)
                    .body(Map.of("from", dates.get(39).toString(), "to", dates.get(399).toString(), "every", "day"))
                    .post("/v1/models/rm/fits").then().statusCode(202).extract().jsonPath().getLong("id");
            // watch its progress; once a few dates are done, stop the process (the job stops after the step in progress)
            int done = 0;
            for (int polls = 0; polls < 100_000 && done < 3; polls++) {
                done = given().port(first.port()).get("/v1/jobs/" + id).then().statusCode(200).extract().path("progress.done");
            }
            assertTrue(done >= 3, "the job made progress");
        }
        try (App second = App.create(config)) {
            JobView stopped = second.jobs().get(id);
            assertEquals("running", stopped.state(), "the store still says running: nobody finished it");
            assertTrue(stopped.progress().done() < total, "stopped mid-way at " + stopped.progress().done());
            second.start();
            assertTrue(second.jobs().runner().awaitFinished(id, Duration.ofMinutes(2)).isPresent(), "the next start resumes the job");
            given().port(second.port()).get("/v1/jobs/" + id).then().statusCode(200).body("state", equalTo("done"))
                    .body("startedAt", equalTo(stopped.startedAt().toString()))
                    .body("fits", hasSize(total)).body("skipped", hasSize(0)).body("failed", hasSize(0));
            List<String> asOfs = given().port(second.port()).get("/v1/models/rm/fits").then().statusCode(200).extract().path("fits.asOf");
            assertEquals(total, asOfs.size(), "one attempt per date: nothing fitted twice, no interrupted fit recorded as failed");
            assertEquals(total, asOfs.stream().distinct().count());
        }
    }
}
