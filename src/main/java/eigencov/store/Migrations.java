package eigencov.store;

import javax.sql.DataSource;
import java.io.IOException;
import java.io.InputStream;
import java.nio.charset.StandardCharsets;
import java.sql.Connection;
import java.sql.PreparedStatement;
import java.sql.ResultSet;
import java.sql.SQLException;
import java.sql.Statement;
import java.util.ArrayList;
import java.util.List;

/**
 * Versioned schema migrations: plain SQL files {@code db/migration/V<n>__<what>.sql} on the class
 * path, applied in order, each in its own transaction, recorded in {@code schema_version}. The list
 * of files is {@link #SCRIPTS}; adding a migration means adding a file and a line there. SQL is kept
 * portable between H2 and PostgreSQL; statements are separated by a line holding only {@code ;}
 * or by a semicolon at the end of a line.
 *
 * <p>Several instances may start at once against one PostgreSQL: the version table is created
 * with IF NOT EXISTS and each migration's row is inserted in the same transaction as its DDL,
 * so a concurrent second applier fails on the primary key and re-reads instead of applying twice.
 */
final class Migrations {

    /** Every migration, oldest first. Never edit a released one: add a new version. */
    static final List<String> SCRIPTS = List.of(
            "V1__panels.sql",
            "V2__models_fits.sql",
            "V3__jobs.sql",
            "V4__short_history.sql");

    /** PostgreSQL advisory lock key that serialises migration appliers (any fixed number unused elsewhere). */
    static final long LOCK_KEY = 727274;

    private final DataSource ds;
    private final Database.Dialect dialect;

    Migrations(DataSource ds, Database.Dialect dialect) {
        this.ds = ds;
        this.dialect = dialect;
    }

    void migrate() {
        try (Connection c = ds.getConnection()) {
            createVersionTable(c);
            int current = currentVersion(c);
            for (String script : SCRIPTS) {
                int version = versionOf(script);
                if (version <= current) continue;
                apply(c, version, script);
            }
        } catch (SQLException e) {
            throw new StoreException("schema migration failed: " + e.getMessage(), e);
        }
    }

    /**
     * On PostgreSQL, {@code CREATE TABLE IF NOT EXISTS} is not safe against a concurrent twin (both
     * see no table, the second fails on the catalog's unique index), so it runs under the same
     * advisory lock as the migrations.
     */
    private void createVersionTable(Connection c) throws SQLException {
        boolean auto = c.getAutoCommit();
        c.setAutoCommit(false);
        try (Statement s = c.createStatement()) {
            if (dialect == Database.Dialect.POSTGRESQL) s.execute("SELECT pg_advisory_xact_lock(" + LOCK_KEY + ")");
            s.execute("CREATE TABLE IF NOT EXISTS schema_version (version INT PRIMARY KEY, script VARCHAR(200) NOT NULL, "
                    + "applied_at TIMESTAMP WITH TIME ZONE DEFAULT CURRENT_TIMESTAMP NOT NULL)");
            c.commit();
        } catch (SQLException e) {
            c.rollback();
            throw e;
        } finally {
            c.setAutoCommit(auto);
        }
    }

    private void apply(Connection c, int version, String script) throws SQLException {
        String sql = read(script);
        boolean auto = c.getAutoCommit();
        c.setAutoCommit(false);
        try (Statement s = c.createStatement()) {
            if (dialect == Database.Dialect.POSTGRESQL) {
                // Serialises concurrent appliers (several instances starting together).
                s.execute("SELECT pg_advisory_xact_lock(" + LOCK_KEY + ")");
            }
            if (currentVersion(c) >= version) {
                c.rollback();
                return;
            }
            for (String stmt : split(sql)) s.execute(stmt);
            try (PreparedStatement p = c.prepareStatement("INSERT INTO schema_version (version, script) VALUES (?, ?)")) {
                p.setInt(1, version);
                p.setString(2, script);
                p.executeUpdate();
            }
            c.commit();
        } catch (SQLException e) {
            c.rollback();
            throw new SQLException("migration " + script + " failed: " + e.getMessage(), e);
        } finally {
            c.setAutoCommit(auto);
        }
    }

    private static int currentVersion(Connection c) throws SQLException {
        try (Statement s = c.createStatement(); ResultSet rs = s.executeQuery("SELECT COALESCE(MAX(version), 0) FROM schema_version")) {
            rs.next();
            return rs.getInt(1);
        }
    }

    static int versionOf(String script) {
        int us = script.indexOf("__");
        if (!script.startsWith("V") || us < 2) throw new IllegalStateException("bad migration name " + script);
        return Integer.parseInt(script.substring(1, us));
    }

    static List<String> split(String sql) {
        List<String> out = new ArrayList<>();
        StringBuilder cur = new StringBuilder();
        for (String line : sql.split("\n")) {
            String t = line.strip();
            if (t.startsWith("--") || t.isEmpty()) continue;
            cur.append(line).append('\n');
            if (t.endsWith(";")) {
                String stmt = cur.toString().strip();
                out.add(stmt.substring(0, stmt.length() - 1));
                cur.setLength(0);
            }
        }
        if (!cur.toString().isBlank()) out.add(cur.toString().strip());
        return out;
    }

    private static String read(String script) {
        String path = "db/migration/" + script;
        try (InputStream in = Migrations.class.getClassLoader().getResourceAsStream(path)) {
            if (in == null) throw new IllegalStateException("missing migration resource " + path);
            return new String(in.readAllBytes(), StandardCharsets.UTF_8);
        } catch (IOException e) {
            throw new IllegalStateException("cannot read " + path, e);
        }
    }
}
