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
                byte[] ids = java.nio.ByteBuffer.allocate(4).order(java.nio.ByteOrder.LITTLE_ENDIAN).putInt(1).array();
                byte[] rets = java.nio.ByteBuffer.allocate(8).order(java.nio.ByteOrder.LITTLE_ENDIAN).putDouble(0.0125).array();
                try (var p = c.prepareStatement("INSERT INTO panel_day (panel_id, obs_date, n, ticker_ids, returns) "
                        + "SELECT p.id, DATE '2025-03-31', 1, ?, ? FROM panel p")) {
                    p.setBytes(1, ids);
                    p.setBytes(2, rets);
                    assertEquals(1, p.executeUpdate());
                }
                try (ResultSet rs = s.executeQuery("SELECT returns FROM panel_day")) {
                    assertTrue(rs.next());
                    assertEquals(0.0125, java.nio.ByteBuffer.wrap(rs.getBytes(1)).order(java.nio.ByteOrder.LITTLE_ENDIAN).getDouble(), 0.0,
                            "the binary column keeps the value exactly");
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
