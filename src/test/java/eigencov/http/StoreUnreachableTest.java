package eigencov.http;

import org.junit.jupiter.api.Test;

import java.sql.SQLException;
import java.sql.SQLTransientConnectionException;

import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

class StoreUnreachableTest {

    @Test
    void a_lost_database_anywhere_in_the_cause_chain_is_unreachable() {
        assertTrue(HttpApi.storeUnreachable(new RuntimeException("read fits", new SQLTransientConnectionException("pool timed out"))));
        assertTrue(HttpApi.storeUnreachable(new IllegalStateException(new SQLException("I/O error", "08006"))));
        assertTrue(HttpApi.storeUnreachable(new SQLException("terminating connection due to administrator command", "57P01")));
    }

    @Test
    void other_store_failures_are_not() {
        assertFalse(HttpApi.storeUnreachable(new RuntimeException(new SQLException("duplicate key", "23505"))));
        assertFalse(HttpApi.storeUnreachable(new SQLException("no state")));
        assertFalse(HttpApi.storeUnreachable(new IllegalArgumentException("bad")));
    }
}
