package eigencov.store;

import eigencov.app.AppConfig;
import org.junit.jupiter.api.Test;

import java.sql.Connection;
import java.sql.ResultSet;
import java.sql.SQLException;
import java.sql.Statement;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.Callable;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.Future;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assumptions.assumeTrue;

class MigrationsTest {

    @Test
    void test_apps_get_the_store_the_run_asks_for() {
        String asked = System.getProperty(AppConfig.TEST_STORE_PROPERTY, "h2");
        try (Database db = open(AppConfig.forTest("dialect").dbUrl())) {
            assertEquals(asked.equals("postgresql") ? Database.Dialect.POSTGRESQL : Database.Dialect.H2, db.dialect());
        }
    }

    @Test
    void an_empty_database_is_brought_to_the_latest_version_once() throws SQLException {
        String url = AppConfig.forTest("migrate").dbUrl();
        try (Database first = open(url)) {
            assertEquals(Migrations.SCRIPTS.size(), versionRows(first));
        }
        try (Database again = open(url)) {
            assertEquals(Migrations.SCRIPTS.size(), versionRows(again), "reopening applies nothing twice");
            try (Connection c = again.dataSource().getConnection(); Statement s = c.createStatement()) {
                s.execute("INSERT INTO panel (name) VALUES ('p1')");
                s.execute("INSERT INTO ticker (symbol) VALUES ('AAA.X')");
                s.execute("INSERT INTO panel_return (panel_id, obs_date, ticker_id, ret) "
                        + "SELECT p.id, DATE '2025-03-31', t.id, 0.0125 FROM panel p, ticker t");
                try (ResultSet rs = s.executeQuery("SELECT ret FROM panel_return")) {
                    assertTrue(rs.next());
                    assertEquals(0.0125, rs.getDouble(1), 0.0, "DOUBLE PRECISION keeps the value exactly");
                }
            }
        }
    }

    @Test
    void instances_starting_together_on_postgresql_apply_each_migration_once() throws Exception {
        String url = AppConfig.forTest("race").dbUrl();
        assumeTrue(Database.dialectOf(url) == Database.Dialect.POSTGRESQL, "several processes share a database only on PostgreSQL");
        ExecutorService pool = Executors.newFixedThreadPool(3);
        try {
            List<Callable<Database>> starts = new ArrayList<>();
            for (int i = 0; i < 3; i++) starts.add(() -> open(url));
            List<Database> opened = new ArrayList<>();
            for (Future<Database> f : pool.invokeAll(starts)) opened.add(f.get());
            assertEquals(Migrations.SCRIPTS.size(), versionRows(opened.get(0)));
            opened.forEach(Database::close);
        } finally {
            pool.shutdown();
        }
    }

    private static Database open(String url) {
        return Database.open(url, "", "", 2);
    }

    private static int versionRows(Database db) throws SQLException {
        try (Connection c = db.dataSource().getConnection(); Statement s = c.createStatement();
             ResultSet rs = s.executeQuery("SELECT COUNT(*) FROM schema_version")) {
            rs.next();
            return rs.getInt(1);
        }
    }
}
