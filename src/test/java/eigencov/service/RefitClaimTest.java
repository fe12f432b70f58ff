package eigencov.service;

import eigencov.store.Database;
import eigencov.store.FitRow;
import eigencov.store.RefitLocks;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;

import java.sql.Connection;
import java.sql.PreparedStatement;
import java.sql.ResultSet;
import java.sql.SQLException;
import java.time.Instant;
import java.util.List;
import java.util.concurrent.Executors;
import java.util.concurrent.ScheduledExecutorService;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assumptions.assumeTrue;

/** Scheduled refits under the cluster-safe claim: left alone while held, taken over when the holder dies. */
class RefitClaimTest {
    private final FakeClock clock = new FakeClock(Instant.parse("2024-06-03T18:00:00Z"));
    private final ServiceFixture fx = new ServiceFixture("claims-" + System.nanoTime(), clock);
    private final ScheduledExecutorService executor = Executors.newSingleThreadScheduledExecutor();

    @AfterEach
    void close() {
        executor.shutdownNow();
        fx.close();
    }

    private RefitScheduler scheduler(ServiceFixture f) {
        return new RefitScheduler(f.modelRepo, f.fitRepo, f.refitLocks, f.fits, ServiceMetrics.NONE, executor, clock, RefitScheduler.DEFAULT_TICK);
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
