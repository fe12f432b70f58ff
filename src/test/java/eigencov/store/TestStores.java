package eigencov.store;

import java.sql.Connection;
import java.sql.DriverManager;
import java.sql.SQLException;
import java.sql.Statement;

/**
 * Opens the store a store test runs on: H2 in memory by default; with
 * {@code -Deigencov.test.postgres=jdbc:postgresql://HOST/DB?user=U} a fresh schema of that
 * PostgreSQL database named after the test, so the same tests check the SQL on both.
 */
final class TestStores {
    private TestStores() {
    }

    static Database open(String name) {
        String pg = System.getProperty("eigencov.test.postgres", "");
        if (pg.isEmpty()) return Database.open("jdbc:h2:mem:" + name + ";DB_CLOSE_DELAY=-1", "", "", 4);
        try (Connection c = DriverManager.getConnection(pg); Statement s = c.createStatement()) {
            s.execute("DROP SCHEMA IF EXISTS " + name + " CASCADE");
            s.execute("CREATE SCHEMA " + name);
        } catch (SQLException e) {
            throw new IllegalStateException("cannot prepare schema " + name + " on " + pg, e);
        }
        return Database.open(pg + (pg.contains("?") ? "&" : "?") + "currentSchema=" + name, "", "", 4);
    }
}
