package eigencov.service;

import eigencov.store.Database;
import eigencov.store.FitRow;
import eigencov.store.ModelRepository;
import eigencov.store.RefitLocks;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;

import java.sql.Connection;
import java.sql.PreparedStatement;
import java.sql.ResultSet;
import java.sql.SQLException;
import java.time.Duration;
import java.time.Instant;
import java.time.LocalDate;
import java.util.List;
import java.util.concurrent.Executors;
import java.util.concurrent.ScheduledExecutorService;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertSame;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assumptions.assumeTrue;

class RefitSchedulerTest {
    private final String dbName = "scheduler-" + System.nanoTime();
    private final FakeClock clock = new FakeClock(Instant.parse("2024-06-03T18:00:00Z"));
    private final ServiceFixture fx = new ServiceFixture(dbName, clock);
    private final ScheduledExecutorService executor = Executors.newSingleThreadScheduledExecutor();

    @AfterEach
    void close() {
        executor.shutdownNow();
        fx.close();
    }

    private RefitScheduler scheduler(ServiceFixture f) {
        return new RefitScheduler(f.modelRepo, f.fitRepo, f.refitLocks, f.fits, ServiceMetrics.NONE, executor, clock, RefitScheduler.DEFAULT_TICK);
    }

    @Test
    void a_missed_refit_is_caught_up_once_after_a_restart_not_once_per_missed_period() {
        fx.panel("p", 8, 40, 1);
        fx.models.put("m", ServiceFixture.spec("p", 30, "PT1H", false));
        RefitScheduler first = scheduler(fx);
        assertEquals(1, first.runDueRefits(), "a model never fitted is due at once");
        assertEquals(0, first.runDueRefits());
        clock.advance(Duration.ofMinutes(59));
        assertEquals(0, first.runDueRefits());

        clock.advance(Duration.ofHours(5)); // the process was down for five periods
        try (ServiceFixture restarted = fx.sameStore()) {
            RefitScheduler again = scheduler(restarted);
            assertEquals(1, again.runDueRefits());
            assertEquals(0, again.runDueRefits());
            clock.advance(Duration.ofHours(1));
            assertEquals(1, again.runDueRefits());
            List<FitView> history = restarted.fits.list("m");
            assertEquals(3, history.size());
            assertTrue(history.stream().allMatch(f -> f.origin().equals(FitService.SCHEDULE) && f.status().equals(FitRow.OK)));
        }
    }

    @Test
    void of_two_instances_only_one_claims_a_due_refit() {
        fx.panel("p", 8, 40, 2);
        fx.models.put("m", ServiceFixture.spec("p", 30, "PT1H", false));
        try (ServiceFixture other = fx.sameStore()) {
            long id = fx.modelRepo.find("m").orElseThrow().id();
            ModelRepository a = fx.modelRepo;
            ModelRepository b = other.modelRepo;
            Instant seen = a.find("m").orElseThrow().lastRefitAt();
            assertTrue(a.claimRefit(id, seen, clock.instant()));
            assertFalse(b.claimRefit(id, seen, clock.instant()), "the second instance saw the same state and lost the claim");
            clock.advance(Duration.ofHours(2));
            assertEquals(1, scheduler(other).runDueRefits() + scheduler(fx).runDueRefits());
        }
    }

    @Test
    void a_failing_scheduled_refit_is_recorded_keeps_the_served_fit_and_is_not_retried_every_tick() {
        fx.panel("p", 8, 40, 3);
        fx.models.put("m", ServiceFixture.spec("p", 30, "PT1H", false));
        RefitScheduler s = scheduler(fx);
        s.runDueRefits();
        ServedFit served = fx.served.resolve("m", null, null);
        fx.models.put("m", ServiceFixture.spec("p", 60, "PT1H", false));
        clock.advance(Duration.ofHours(1));
        assertEquals(1, s.runDueRefits());
        assertEquals(0, s.runDueRefits());
        assertSame(served, fx.served.resolve("m", null, null));
        FitView failed = fx.fits.list("m").get(0);
        assertEquals(FitRow.FAILED, failed.status());
        assertEquals(FitService.SCHEDULE, failed.origin());
    }

    private static void ingest(PanelService panels, SyntheticReturns.Row row) {
        panels.ingest("p", ReturnsFormat.CSV, new java.io.ByteArrayInputStream(SyntheticReturns.csv(List.of(row)).getBytes()));
    }

    @Test
    void an_ingest_that_adds_a_new_last_date_fits_only_the_models_that_ask_for_it() throws Exception {
        List<LocalDate> dates = fx.panel("p", 8, 40, 4);
        fx.models.put("follows", ServiceFixture.spec("p", 30, null, true));
        fx.models.put("ignores", ServiceFixture.spec("p", 30, null, false));
        RefitScheduler s = scheduler(fx);
        s.afterIngest("p", dates.get(39), dates.get(39));
        s.afterIngest("other", dates.get(38), dates.get(39));
        executor.submit(() -> { }).get(); // the executor is single-threaded: everything queued before has run
        assertEquals(0, fx.fits.list("follows").size());

        // Through the ingest service: a new last date fits, a correction of an old date does not.
        PanelService panels = new PanelService(fx.windows, 10, s);
        ingest(panels, new SyntheticReturns.Row(dates.get(39).plusDays(3), "T00", 0.01));
        executor.submit(() -> { }).get();
        ingest(panels, new SyntheticReturns.Row(dates.get(5), "T00", 0.02));
        executor.submit(() -> { }).get();
        List<FitView> fits = fx.fits.list("follows");
        assertEquals(1, fits.size());
        assertEquals(FitService.INGEST, fits.get(0).origin());
        assertEquals(dates.get(39).plusDays(3), fits.get(0).window().to());
        assertEquals(0, fx.fits.list("ignores").size());
    }

    private long dueModel() {
        fx.panel("p", 8, 40, 5);
        fx.models.put("m", ServiceFixture.spec("p", 30, "PT1H", false));
        return fx.modelRepo.find("m").orElseThrow().id();
    }

    @Test
    void a_due_refit_whose_claim_is_held_is_left_to_the_holder_and_run_once_released() {
        long id = dueModel();
        RefitLocks.Claim running = fx.refitLocks.tryClaim(id).orElseThrow();
        assertEquals(0, scheduler(fx).runDueRefits(), "another run holds the claim");
        assertEquals(List.of(), fx.fits.list("m"), "nothing stored while the holder runs");
        running.close();
        assertEquals(1, scheduler(fx).runDueRefits());
        assertEquals(0, scheduler(fx).runDueRefits(), "done: not due again within the period");
    }

    @Test
    void a_refit_claimed_by_an_instance_that_died_is_run_by_another_on_its_next_check() throws SQLException {
        assumeTrue(fx.db.dialect() == Database.Dialect.POSTGRESQL, "several instances share a database only on PostgreSQL");
        long id = dueModel();
        try (ServiceFixture other = fx.sameStore()) {
            RefitLocks.Claim dying = fx.refitLocks.tryClaim(id).orElseThrow();
            RefitScheduler survivor = scheduler(other);
            assertEquals(0, survivor.runDueRefits(), "the first instance is running it");

            // The first instance dies mid-refit: its database session ends, taking the claim along.
            terminateHolder(other.db, id);
            int runs = 0;
            for (int check = 0; check < 200 && runs == 0; check++) runs = survivor.runDueRefits();
            assertEquals(1, runs, "the survivor ran the refit once the claim was gone");
            List<FitView> history = other.fits.list("m");
            assertEquals(1, history.size());
            assertEquals(FitRow.OK, history.get(0).status());
            assertEquals(FitService.SCHEDULE, history.get(0).origin());
            dying.close();
            assertEquals(0, survivor.runDueRefits(), "not due again, and the dead claim's release frees nothing");
        }
    }

    private static void terminateHolder(Database db, long modelId) throws SQLException {
        try (Connection c = db.dataSource().getConnection();
             PreparedStatement p = c.prepareStatement("SELECT pg_terminate_backend(pid) FROM pg_locks "
                     + "WHERE locktype = 'advisory' AND objid = ? AND granted")) {
            p.setLong(1, modelId);
            try (ResultSet rs = p.executeQuery()) {
                assertTrue(rs.next() && rs.getBoolean(1), "the holder's session was found and ended");
            }
        }
    }
}
