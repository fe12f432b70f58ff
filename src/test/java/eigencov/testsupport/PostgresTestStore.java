package eigencov.testsupport;

import eigencov.app.TestStore;

import java.lang.management.ManagementFactory;
import java.net.InetAddress;
import java.net.UnknownHostException;
import java.nio.charset.StandardCharsets;
import java.security.MessageDigest;
import java.security.NoSuchAlgorithmException;
import java.sql.Connection;
import java.sql.DriverManager;
import java.sql.ResultSet;
import java.sql.SQLException;
import java.sql.Statement;
import java.util.ArrayList;
import java.util.HexFormat;
import java.util.List;
import java.util.Locale;
import java.util.Properties;
import java.util.UUID;

/**
 * The PostgreSQL side of the two-store test run. Each test JVM creates one database of its own
 * ({@code ect_<host>_<pid>_<random>}) on the server at {@code EIGENCOV_TEST_PG_URL} (default
 * {@value #DEFAULT_URL}, user {@code EIGENCOV_TEST_PG_USER} default {@code postgres}, password
 * {@code EIGENCOV_TEST_PG_PASSWORD} default empty) and gives every test app a fresh schema in it.
 * A schema costs a few milliseconds where a database costs a checkpoint on drop (about a second
 * each here). The run database is dropped when the JVM exits; one left behind by a killed run
 * of this host is dropped by the next run once its process is gone.
 */
public final class PostgresTestStore implements TestStore {
    static final String DEFAULT_URL = "jdbc:postgresql://127.0.0.1:5432/test";
    private static final String PREFIX = "ect_";

    @Override
    public String name() {
        return "postgresql";
    }

    @Override
    public String freshJdbcUrl(String databaseName) {
        RunDatabase run = RunDatabase.get();
        String schema = "t_" + databaseName.toLowerCase(Locale.ROOT).replaceAll("[^a-z0-9]", "_");
        schema = schema.substring(0, Math.min(schema.length(), 40)) + "_" + randomSuffix();
        try (Connection c = run.settings.connect(run.name); Statement s = c.createStatement()) {
            s.execute("CREATE SCHEMA " + schema);
        } catch (SQLException e) {
            throw new IllegalStateException("cannot create test schema " + schema + " in " + run.name + ": " + e.getMessage(), e);
        }
        return run.settings.urlOf(run.name) + "currentSchema=" + schema;
    }

    private static String randomSuffix() {
        return UUID.randomUUID().toString().substring(0, 8);
    }

    /** Where the test PostgreSQL is and how to log in, from the environment. */
    record Settings(String url, String user, String password) {
        static Settings fromEnv() {
            String url = System.getenv().getOrDefault("EIGENCOV_TEST_PG_URL", DEFAULT_URL);
            if (!url.startsWith("jdbc:postgresql://")) throw new IllegalStateException("EIGENCOV_TEST_PG_URL must start with jdbc:postgresql://, was " + url);
            return new Settings(url, System.getenv().getOrDefault("EIGENCOV_TEST_PG_USER", "postgres"),
                    System.getenv().getOrDefault("EIGENCOV_TEST_PG_PASSWORD", ""));
        }

        /** The URL of database {@code db} on the same server, with credentials, ending ready for one more parameter. */
        String urlOf(String db) {
            int q = url.indexOf('?');
            String base = q < 0 ? url : url.substring(0, q);
            String params = q < 0 ? "" : url.substring(q + 1) + "&";
            String server = base.substring(0, base.lastIndexOf('/') + 1);
            return server + db + "?" + params + "user=" + user + (password.isEmpty() ? "" : "&password=" + password) + "&";
        }

        Connection connect(String db) throws SQLException {
            Properties p = new Properties();
            p.setProperty("connectTimeout", "3");
            p.setProperty("loginTimeout", "5");
            return DriverManager.getConnection(db == null ? urlWithCredentials() : urlOf(db), p);
        }

        private String urlWithCredentials() {
            String db = url.substring(url.lastIndexOf('/') + 1);
            int q = db.indexOf('?');
            return urlOf(q < 0 ? db : db.substring(0, q));
        }

        /** Null when the server answers, else why not. */
        String unreachableReason() {
            try (Connection c = connect(null)) {
                return c.isValid(3) ? null : "connection not valid";
            } catch (SQLException e) {
                return e.getMessage();
            }
        }
    }

    /** The database of this test JVM: created on first use, dropped at exit. */
    static final class RunDatabase {
        final Settings settings;
        final String name;

        private RunDatabase(Settings settings, String name) {
            this.settings = settings;
            this.name = name;
        }

        static RunDatabase get() {
            return Holder.RUN;
        }

        /** Lazy, thread-safe initialisation by the class loader; nothing changes after it. */
        private static final class Holder {
            static final RunDatabase RUN = create(Settings.fromEnv());
        }

        private static RunDatabase create(Settings settings) {
            long pid = ProcessHandle.current().pid();
            String host = hostTag();
            String name = PREFIX + host + "_" + pid + "_" + randomSuffix();
            try (Connection c = settings.connect(null); Statement s = c.createStatement()) {
                dropLeftovers(s, host);
                s.execute("CREATE DATABASE " + name);
            } catch (SQLException e) {
                throw new IllegalStateException("cannot create test database " + name + " at " + settings.url() + ": " + e.getMessage(), e);
            }
            Runtime.getRuntime().addShutdownHook(new Thread(() -> drop(settings, name), "drop-" + name));
            return new RunDatabase(settings, name);
        }

        /** Drops run databases of this host whose process has ended (a killed earlier run). */
        private static void dropLeftovers(Statement s, String host) throws SQLException {
            List<String> stale = new ArrayList<>();
            try (ResultSet rs = s.executeQuery("SELECT datname FROM pg_database WHERE datname LIKE '" + PREFIX + host + "\\_%'")) {
                while (rs.next()) {
                    String db = rs.getString(1);
                    String[] parts = db.split("_");
                    if (parts.length == 4 && ProcessHandle.of(Long.parseLong(parts[2])).isEmpty()) stale.add(db);
                }
            }
            for (String db : stale) s.execute("DROP DATABASE IF EXISTS " + db + " WITH (FORCE)");
        }

        private static void drop(Settings settings, String name) {
            try (Connection c = settings.connect(null); Statement s = c.createStatement()) {
                s.execute("DROP DATABASE IF EXISTS " + name + " WITH (FORCE)");
            } catch (SQLException e) {
                System.err.println("could not drop test database " + name + " (the next run drops it): " + e.getMessage());
            }
        }

        /** Six hex digits of the host name, so two machines sharing one server never drop each other's databases. */
        private static String hostTag() {
            String host;
            try {
                host = InetAddress.getLocalHost().getHostName();
            } catch (UnknownHostException e) {
                host = ManagementFactory.getRuntimeMXBean().getName();
            }
            try {
                byte[] d = MessageDigest.getInstance("SHA-256").digest(host.getBytes(StandardCharsets.UTF_8));
                return HexFormat.of().formatHex(d, 0, 3);
            } catch (NoSuchAlgorithmException e) {
                throw new IllegalStateException(e);
            }
        }
    }
}
