package eigencov.service;

import com.fasterxml.jackson.databind.JsonNode;
import eigencov.store.Database;
import eigencov.store.FitRepository;
import eigencov.store.JobRow;
import eigencov.store.ModelRow;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;

import java.time.Instant;
import java.time.LocalDate;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.concurrent.CountDownLatch;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicBoolean;
import java.util.concurrent.atomic.AtomicReference;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assumptions.assumeTrue;

/**
 * Jobs on the store, run by the test itself (the fixture's runner has no thread): skipping, failed dates,
 * a run stopped mid-way and resumed by a restarted process, cancelling, two instances sharing PostgreSQL,
 * and the served fit of a model staying in place while its history is backfilled.
 */
class JobsTest {
    private final FakeClock clock = new FakeClock(Instant.parse("2024-06-03T18:00:00Z"));
    private final ServiceFixture fx = new ServiceFixture("jobs-" + System.nanoTime(), clock);
    private final List<ServiceFixture> others = new ArrayList<>();

    /** A process dying mid-job: an Error the runner does not catch (its claim is released as a dead session's would be). */
    private static final class SimulatedCrash extends Error {
        SimulatedCrash() {
            super("simulated crash");
        }
    }

    @AfterEach
    void close() {
        others.forEach(ServiceFixture::close);
        fx.close();
    }

    private ServiceFixture restarted() {
        ServiceFixture f = fx.sameStore();
        others.add(f);
        return f;
    }

    /** Ok and failed attempts of model m per date, from the store. */
    private static Map<LocalDate, List<FitRepository.Mark>> attempts(ServiceFixture f, String model, List<LocalDate> dates) {
        ModelRow m = f.modelRepo.find(model).orElseThrow();
        return f.fitRepo.attemptsAt(m.id(), dates);
    }

    private static void assertOneAttemptEach(ServiceFixture f, String model, List<LocalDate> dates) {
        Map<LocalDate, List<FitRepository.Mark>> a = attempts(f, model, dates);
        for (LocalDate d : dates) assertEquals(1, a.getOrDefault(d, List.of()).size(), "attempts at " + d);
    }

    private JsonNode details(ServiceFixture f, long id) {
        return f.mapper.valueToTree(f.jobs.get(id));
    }

    @Test
    void a_backfill_skips_fitted_dates_records_failed_ones_and_fits_the_rest_once() {
        List<LocalDate> dates = fx.panel("p", 12, 60, 1);
        fx.models.put("m", ServiceFixture.spec("p", 40, null, false));
        FitView before = fx.fits.fit("m", dates.get(45), FitService.REQUEST);
        // dates[30..38] have fewer than 40 dates up to them: they fail, and the job goes on
        long id = fx.backfills.submit("m", dates.get(30), dates.get(59), "day").id();
        assertEquals(JobRow.QUEUED, fx.jobs.get(id).state());
        assertTrue(fx.runner.run(id));

        JsonNode job = details(fx, id);
        assertEquals("done", job.path("state").asText());
        assertEquals(30, job.path("progress").path("done").asInt());
        assertEquals(0, job.path("progress").path("etaSeconds").asInt());
        assertEquals(List.of(dates.get(45).toString()), texts(job.path("skipped")));
        assertEquals(9, job.path("failed").size());
        assertEquals(dates.get(30).toString(), job.path("failed").get(0).path("asOf").asText());
        assertTrue(job.path("failed").get(0).path("reason").asText().contains("window needs 40"), job.path("failed").get(0).toString());
        assertEquals(20, job.path("fits").size());
        assertOneAttemptEach(fx, "m", dates.subList(30, 60));
        assertEquals(before.id(), attempts(fx, "m", List.of(dates.get(45))).get(dates.get(45)).get(0).fitId());
        // the newest fit (dates[59]) is served: a backfill of later dates publishes as a refit would
        assertEquals(dates.get(59), fx.served.resolve("m", null, null).ref().asOf());
        assertFalse(fx.runner.run(id), "a finished job is not run again");
    }

    @Test
    void a_job_stopped_mid_way_resumes_on_a_restarted_process_without_fitting_any_date_twice() {
        List<LocalDate> dates = fx.panel("p", 12, 60, 2);
        fx.models.put("m", ServiceFixture.spec("p", 40, null, false));
        long id = fx.backfills.submit("m", dates.get(39), dates.get(59), "day").id();
        fx.observer.set((job, done, total) -> {
            if (done == 5) throw new SimulatedCrash();
        });
        assertThrows(SimulatedCrash.class, () -> fx.runner.run(id));
        JobRow stopped = fx.jobRepo.find(id).orElseThrow();
        assertEquals(JobRow.RUNNING, stopped.state(), "the store still says running: nobody finished it");
        assertEquals(5, stopped.done());

        ServiceFixture again = restarted();
        List<Integer> seen = new ArrayList<>();
        again.observer.set((job, done, total) -> seen.add(done));
        assertEquals(1, again.runner.runPending());
        JsonNode job = details(again, id);
        assertEquals("done", job.path("state").asText());
        assertEquals(21, job.path("fits").size(), "the fits made before the stop are the job's own, not skipped");
        assertEquals(0, job.path("skipped").size());
        assertEquals(6, seen.get(0), "progress goes on from where it stopped");
        assertOneAttemptEach(again, "m", dates.subList(39, 60));
    }

    @Test
    void cancel_stops_a_running_job_keeps_what_it_stored_and_a_finished_job_cannot_be_cancelled() {
        List<LocalDate> dates = fx.panel("p", 12, 60, 3);
        fx.models.put("m", ServiceFixture.spec("p", 40, null, false));
        long id = fx.backfills.submit("m", dates.get(39), dates.get(59), "day").id();
        fx.observer.set((job, done, total) -> {
            if (done == 3) assertEquals("cancelled", fx.jobs.cancel(job).state());
        });
        assertTrue(fx.runner.run(id));
        JsonNode job = details(fx, id);
        assertEquals("cancelled", job.path("state").asText());
        assertEquals(3, job.path("fits").size());
        assertTrue(job.path("finishedAt").isTextual());
        assertTrue(job.path("progress").path("etaSeconds").isNull());
        Map<LocalDate, List<FitRepository.Mark>> stored = attempts(fx, "m", dates.subList(39, 60));
        assertEquals(3, stored.size(), "the fits made before the cancel stay, and no more were made");
        stored.values().forEach(l -> assertEquals(id, l.get(0).jobId()));

        assertThrows(ConflictException.class, () -> fx.jobs.cancel(id));
        assertThrows(NotFoundException.class, () -> fx.jobs.cancel(id + 1000));
        assertThrows(NotFoundException.class, () -> fx.jobs.get(id + 1000));
        assertFalse(fx.runner.run(id));
    }

    @Test
    void a_backfill_of_earlier_dates_never_takes_the_place_of_the_served_fit() {
        List<LocalDate> dates = fx.panel("p", 12, 60, 4);
        fx.models.put("m", ServiceFixture.spec("p", 40, null, false));
        FitView newest = fx.fits.fit("m", dates.get(59), FitService.REQUEST);
        // a restarted process serves nothing yet when the backfill publishes its first (earlier) fit
        ServiceFixture again = restarted();
        long id = again.backfills.submit("m", dates.get(39), dates.get(50), "day").id();
        AtomicReference<Long> servedDuring = new AtomicReference<>();
        again.observer.set((job, done, total) -> {
            if (done == 1) servedDuring.set(again.served.resolve("m", null, null).ref().id());
        });
        assertTrue(again.runner.run(id));
        assertEquals(newest.id(), servedDuring.get());
        assertEquals(newest.id(), again.served.resolve("m", null, null).ref().id());
    }

    @Test
    void two_instances_on_postgresql_never_run_one_job_at_once_and_the_second_resumes_when_the_first_dies() throws Exception {
        assumeTrue(fx.db.dialect() == Database.Dialect.POSTGRESQL, "several instances share a store only on PostgreSQL");
        List<LocalDate> dates = fx.panel("p", 12, 60, 5);
        fx.models.put("m", ServiceFixture.spec("p", 40, null, false));
        ServiceFixture b = restarted();
        long id = fx.backfills.submit("m", dates.get(39), dates.get(59), "day").id();
        CountDownLatch holding = new CountDownLatch(1);
        CountDownLatch release = new CountDownLatch(1);
        AtomicBoolean crash = new AtomicBoolean(true);
        fx.observer.set((job, done, total) -> {
            if (done != 4) return;
            holding.countDown();
            try {
                assertTrue(release.await(60, TimeUnit.SECONDS));
            } catch (InterruptedException e) {
                throw new IllegalStateException(e);
            }
            if (crash.get()) throw new SimulatedCrash();
        });
        AtomicReference<Throwable> died = new AtomicReference<>();
        Thread a = new Thread(() -> {
            try {
                fx.runner.run(id);
            } catch (Throwable t) {
                died.set(t);
            }
        }, "instance-a");
        a.start();
        assertTrue(holding.await(60, TimeUnit.SECONDS));
        assertEquals(0, b.runner.runPending(), "instance b does not run a job a holds");
        assertFalse(b.runner.run(id));
        release.countDown();
        a.join(60_000);
        assertTrue(died.get() instanceof SimulatedCrash);
        // a's claim died with it: b resumes
        assertTrue(b.runner.run(id));
        JsonNode job = details(b, id);
        assertEquals("done", job.path("state").asText());
        assertEquals(21, job.path("fits").size());
        assertOneAttemptEach(b, "m", dates.subList(39, 60));
    }

    @Test
    void an_evaluation_stopped_mid_way_resumes_and_a_repeated_one_reuses_every_fit() {
        List<LocalDate> dates = fx.panel("p", 12, 80, 6);
        fx.models.put("a", ServiceFixture.spec("p", 40, null, false));
        fx.models.put("b", new ModelSpec("p", 30, new ModelSpec.Factors("fixed", 1, null, null), 20.0, 0.9, "covariance", null, null, null));
        EvaluationRequest r = new EvaluationRequest(List.of("a", "b"), dates.get(45), dates.get(75), "week", 2,
                new EvaluationRequest.Random(3, 4, 9L), List.of("sample", "ledoit-wolf"));
        long id = fx.evaluations.submit(r).id();
        fx.observer.set((job, done, total) -> {
            if (done == 4) throw new SimulatedCrash();
        });
        assertThrows(SimulatedCrash.class, () -> fx.runner.run(id));

        ServiceFixture again = restarted();
        assertTrue(again.runner.run(id));
        EvaluationView v = again.evaluations.get(id);
        assertEquals("done", v.state(), String.valueOf(v.error()));
        List<LocalDate> used = new ArrayList<>();
        v.dates().forEach(d -> used.add(LocalDate.parse(d.asText())));
        assertEquals(6, v.results().size());
        assertOneAttemptEach(again, "a", used);
        assertOneAttemptEach(again, "b", used);

        int fitsBefore = again.fitRepo.list("a").size() + again.fitRepo.list("b").size();
        long repeat = again.evaluations.submit(r).id();
        assertTrue(again.runner.run(repeat));
        assertEquals(fitsBefore, again.fitRepo.list("a").size() + again.fitRepo.list("b").size(), "a repeated evaluation makes no fit");
        assertEquals(again.mapper.valueToTree(v.results()), again.mapper.valueToTree(again.evaluations.get(repeat).results()),
                "the same forecasts give the same results");
        assertNull(again.evaluations.get(repeat).error());
    }

    @Test
    void an_evaluations_forecasts_are_the_fits_a_post_as_of_makes() {
        List<LocalDate> dates = fx.panel("p", 12, 80, 7);
        ModelSpec spec = new ModelSpec("p", 40, new ModelSpec.Factors("bai-ng", null, null, 4), 15.0, 0.9, "correlation", null, null, null);
        fx.models.put("a", spec);
        fx.models.put("twin", spec);
        long id = fx.evaluations.submit(new EvaluationRequest(List.of("a"), dates.get(40), dates.get(70), "week", 1, null, null)).id();
        assertTrue(fx.runner.run(id));
        EvaluationView v = fx.evaluations.get(id);
        assertEquals("done", v.state(), String.valueOf(v.error()));
        for (JsonNode d : v.dates()) {
            LocalDate t = LocalDate.parse(d.asText());
            long made = attempts(fx, "a", List.of(t)).get(t).get(0).fitId();
            eigencov.math.FactorModel evaluated = fx.fits.stored(made).model();
            fx.fits.fit("twin", t, FitService.REQUEST);
            eigencov.math.FactorModel asked = fx.served.resolve("twin", t, null).result().model();
            assertEquals(asked.tickers(), evaluated.tickers(), "universe at " + t);
            assertEquals(asked.factors(), evaluated.factors(), "k at " + t);
            // the same numbers (a factor's sign may differ with the alignment history; B F B' does not)
            org.junit.jupiter.api.Assertions.assertArrayEquals(asked.specificVariances(), evaluated.specificVariances(), "D at " + t);
            org.junit.jupiter.api.Assertions.assertArrayEquals(asked.factorCovariance(), evaluated.factorCovariance(), "F at " + t);
            double[] a = asked.exposures();
            double[] e = evaluated.exposures();
            for (int i = 0; i < a.length; i++) assertEquals(Math.abs(a[i]), Math.abs(e[i]), 0.0, "|B| at " + t);
        }
    }

    private static List<String> texts(JsonNode array) {
        List<String> out = new ArrayList<>();
        array.forEach(n -> out.add(n.asText()));
        return out;
    }
}
