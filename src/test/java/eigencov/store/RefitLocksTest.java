package eigencov.store;

import eigencov.app.AppConfig;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;

import java.sql.Connection;
import java.sql.PreparedStatement;
import java.sql.ResultSet;
import java.sql.SQLException;
import java.util.Optional;

import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assumptions.assumeTrue;

class RefitLocksTest {
    private String url;
    private Database one;

    @BeforeEach
    void open() {
        url = AppConfig.forTest("locks").dbUrl();
        one = Database.open(url, "", "", 3);
    }

    @AfterEach
    void close() {
        one.close();
    }

    @Test
    void a_claim_is_exclusive_until_released_and_per_model() {
        RefitLocks locks = new RefitLocks(one);
        Optional<RefitLocks.Claim> first = locks.tryClaim(7);
        assertTrue(first.isPresent());
        assertTrue(locks.tryClaim(7).isEmpty(), "second claim on the same model while held");
        try (RefitLocks.Claim other = locks.tryClaim(8).orElseThrow()) {
            assertTrue(other != null, "another model is independent");
        }
        first.get().close();
        try (RefitLocks.Claim again = locks.tryClaim(7).orElseThrow()) {
            assertTrue(again != null, "free again after release");
        }
    }

    @Test
    void two_instances_on_postgresql_never_hold_the_same_claim() {
        assumeTrue(one.dialect() == Database.Dialect.POSTGRESQL, "several instances share a database only on PostgreSQL");
        try (Database two = Database.open(url, "", "", 3)) {
            RefitLocks a = new RefitLocks(one);
            RefitLocks b = new RefitLocks(two);
            try (RefitLocks.Claim held = a.tryClaim(3).orElseThrow()) {
                assertTrue(b.tryClaim(3).isEmpty(), "the other instance must not get a held claim");
            }
            try (RefitLocks.Claim taken = b.tryClaim(3).orElseThrow()) {
                assertTrue(a.tryClaim(3).isEmpty());
            }
        }
    }

    @Test
    void a_claim_dies_with_the_session_of_its_holder() throws SQLException {
        assumeTrue(one.dialect() == Database.Dialect.POSTGRESQL, "session-bound claims exist only on PostgreSQL");
        try (Database two = Database.open(url, "", "", 3)) {
            RefitLocks a = new RefitLocks(one);
            RefitLocks b = new RefitLocks(two);
            RefitLocks.Claim held = a.tryClaim(4).orElseThrow();
            // The holder's process dies: its backend is terminated, as when the connection drops.
            try (Connection c = two.dataSource().getConnection();
                 PreparedStatement p = c.prepareStatement("SELECT pg_terminate_backend(pid) FROM pg_locks "
                         + "WHERE locktype = 'advisory' AND classid = ? AND objid = ? AND granted")) {
                p.setLong(1, RefitLocks.NAMESPACE);
                p.setLong(2, 4);
                try (ResultSet rs = p.executeQuery()) {
                    assertTrue(rs.next() && rs.getBoolean(1), "the holder's session was found and ended");
                }
            }
            assertTrue(waitForClaim(b, 4), "the claim is free once its holder's session has ended");
            held.close();
            assertFalse(a.tryClaim(4).isPresent(), "releasing a dead claim does not free the new holder's");
        }
    }

    /** The server ends a terminated session asynchronously; ask a bounded number of times. */
    private static boolean waitForClaim(RefitLocks locks, long model) {
        for (int i = 0; i < 500; i++) {
            Optional<RefitLocks.Claim> c = locks.tryClaim(model);
            if (c.isPresent()) return true;
            Thread.onSpinWait();
        }
        return false;
    }
}
