package eigencov.app;

import eigencov.http.ApiKeys;
import eigencov.http.HttpApi;

import java.nio.file.Path;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;

/**
 * The whole configuration of one eigencov process: one immutable record, built once at start-up
 * from command-line flags and {@code EIGENCOV_*} environment variables (flags win), validated in
 * the compact constructor. Nothing changes it at run time.
 *
 * @param port            HTTP port (0 = any free port, used by tests)
 * @param host            interface to bind; {@code null} = loopback when no API keys are configured, else all interfaces
 * @param dbUrl           JDBC URL of the store (H2 file under ./data by default, or PostgreSQL)
 * @param dbUser          database user (may be empty)
 * @param dbPassword      database password (may be empty; masked when printed)
 * @param dbPoolSize      maximum connections in the pool
 * @param demo            load {@code demoDir} and create the demo models on first start
 * @param demoDir         folder holding the demo data
 * @param apiKeys         raw key specification {@code scope:key,scope:key} (scopes {@code read}, {@code write}); empty = no auth
 * @param maxBodyBytes    largest accepted request body (413 above)
 * @param maxAbsReturn    largest accepted |return| (simple return; 10 = +1000 %)
 * @param shutdownGraceMs how long a stop waits for in-flight requests
 * @param slowRequestMs   a request taking at least this long is logged (at INFO) even when it succeeded;
 *                        other successful requests are logged at DEBUG only
 */
public record AppConfig(
        int port,
        String host,
        String dbUrl,
        String dbUser,
        String dbPassword,
        int dbPoolSize,
        boolean demo,
        Path demoDir,
        String apiKeys,
        long maxBodyBytes,
        double maxAbsReturn,
        long shutdownGraceMs,
        long slowRequestMs) {

    public static final int DEFAULT_PORT = 8080;
    public static final String DEFAULT_DB_URL = "jdbc:h2:file:./data/eigencov;AUTO_SERVER=FALSE";
    public static final int DEFAULT_POOL_SIZE = 10;
    public static final Path DEFAULT_DEMO_DIR = Path.of("demo-data");
    public static final long DEFAULT_MAX_BODY_BYTES = 128L * 1024 * 1024;
    public static final double DEFAULT_MAX_ABS_RETURN = 10.0;
    public static final long DEFAULT_SHUTDOWN_GRACE_MS = 10_000;
    public static final long DEFAULT_SLOW_REQUEST_MS = HttpApi.DEFAULT_SLOW_REQUEST_MS;

    public AppConfig {
        if (port < 0 || port > 65_535) throw new ConfigException("port must be between 0 and 65535, was " + port);
        if (dbUrl == null || !dbUrl.startsWith("jdbc:")) throw new ConfigException("db URL must start with jdbc:, was " + dbUrl);
        if (dbPoolSize < 1 || dbPoolSize > 200) throw new ConfigException("dbPoolSize must be between 1 and 200, was " + dbPoolSize);
        if (maxBodyBytes < 1024) throw new ConfigException("maxBodyBytes must be at least 1024, was " + maxBodyBytes);
        if (!(maxAbsReturn > 0) || Double.isInfinite(maxAbsReturn))
            throw new ConfigException("maxAbsReturn must be a positive finite number, was " + maxAbsReturn);
        if (shutdownGraceMs < 0) throw new ConfigException("shutdownGraceMs must not be negative, was " + shutdownGraceMs);
        if (slowRequestMs < 1) throw new ConfigException("slowRequestMs must be at least 1, was " + slowRequestMs);
        dbUser = dbUser == null ? "" : dbUser;
        dbPassword = dbPassword == null ? "" : dbPassword;
        apiKeys = apiKeys == null ? "" : apiKeys.trim();
        demoDir = demoDir == null ? DEFAULT_DEMO_DIR : demoDir;
        try {
            ApiKeys.parse(apiKeys);
        } catch (IllegalArgumentException e) {
            throw new ConfigException("apiKeys: " + e.getMessage());
        }
    }

    /** Defaults for everything; tests start from here and override with {@code with...}. */
    public static AppConfig defaults() {
        return new AppConfig(DEFAULT_PORT, null, DEFAULT_DB_URL, "", "", DEFAULT_POOL_SIZE, false, DEFAULT_DEMO_DIR, "",
                DEFAULT_MAX_BODY_BYTES, DEFAULT_MAX_ABS_RETURN, DEFAULT_SHUTDOWN_GRACE_MS, DEFAULT_SLOW_REQUEST_MS);
    }

    /** System property naming the store test apps use: {@code h2} (default) or {@code postgresql}. */
    public static final String TEST_STORE_PROPERTY = "eigencov.test.db";

    /**
     * Configuration for an in-process test server: any free port and a private, empty database:
     * in-memory H2, or, when the build's second test run sets {@value #TEST_STORE_PROPERTY}
     * (see pom.xml), a fresh database on the test PostgreSQL from the {@link TestStore} in test
     * sources. Reading a system property here is deliberate: this factory exists for tests only.
     */
    public static AppConfig forTest(String databaseName) {
        AppConfig base = defaults().withPort(0);
        String store = System.getProperty(TEST_STORE_PROPERTY, "h2");
        if (store.equals("h2")) return base.withDbUrl("jdbc:h2:mem:" + databaseName + ";DB_CLOSE_DELAY=-1");
        return base.withDbUrl(TestStore.named(store).freshJdbcUrl(databaseName));
    }

    public AppConfig withPort(int p) { return new AppConfig(p, host, dbUrl, dbUser, dbPassword, dbPoolSize, demo, demoDir, apiKeys, maxBodyBytes, maxAbsReturn, shutdownGraceMs, slowRequestMs); }
    public AppConfig withDbUrl(String u) { return new AppConfig(port, host, u, dbUser, dbPassword, dbPoolSize, demo, demoDir, apiKeys, maxBodyBytes, maxAbsReturn, shutdownGraceMs, slowRequestMs); }
    public AppConfig withDemo(boolean d, Path dir) { return new AppConfig(port, host, dbUrl, dbUser, dbPassword, dbPoolSize, d, dir, apiKeys, maxBodyBytes, maxAbsReturn, shutdownGraceMs, slowRequestMs); }
    public AppConfig withApiKeys(String k) { return new AppConfig(port, host, dbUrl, dbUser, dbPassword, dbPoolSize, demo, demoDir, k, maxBodyBytes, maxAbsReturn, shutdownGraceMs, slowRequestMs); }
    public AppConfig withMaxBodyBytes(long b) { return new AppConfig(port, host, dbUrl, dbUser, dbPassword, dbPoolSize, demo, demoDir, apiKeys, b, maxAbsReturn, shutdownGraceMs, slowRequestMs); }
    public AppConfig withMaxAbsReturn(double r) { return new AppConfig(port, host, dbUrl, dbUser, dbPassword, dbPoolSize, demo, demoDir, apiKeys, maxBodyBytes, r, shutdownGraceMs, slowRequestMs); }

    /** True when no API keys are configured: the server then binds to loopback only. */
    public boolean authDisabled() {
        return apiKeys.isEmpty();
    }

    /** The interface actually bound. */
    public String bindHost() {
        if (host != null && !host.isBlank()) return host;
        return authDisabled() ? "127.0.0.1" : "0.0.0.0";
    }

    /** Every setting as printable text, secrets masked. */
    public Map<String, String> describe() {
        Map<String, String> m = new LinkedHashMap<>();
        m.put("port", Integer.toString(port));
        m.put("host", bindHost());
        m.put("db", maskUrl(dbUrl));
        m.put("dbUser", dbUser);
        m.put("dbPassword", dbPassword.isEmpty() ? "" : "****");
        m.put("dbPoolSize", Integer.toString(dbPoolSize));
        m.put("demo", Boolean.toString(demo));
        m.put("demoDir", demoDir.toString());
        m.put("apiKeys", authDisabled() ? "(none: loopback only)" : maskKeys(apiKeys));
        m.put("maxBodyBytes", Long.toString(maxBodyBytes));
        m.put("maxAbsReturn", Double.toString(maxAbsReturn));
        m.put("shutdownGraceMs", Long.toString(shutdownGraceMs));
        m.put("slowRequestMs", Long.toString(slowRequestMs));
        return m;
    }

    private static String maskUrl(String url) {
        return url.replaceAll("(?i)(password=)[^&;]*", "$1****");
    }

    private static String maskKeys(String keys) {
        List<String> out = new ArrayList<>();
        for (String part : keys.split(",")) {
            int colon = part.indexOf(':');
            out.add((colon >= 0 ? part.substring(0, colon) : "?") + ":****");
        }
        return String.join(",", out);
    }

    /**
     * Builds the configuration from {@code serve} arguments and the environment. Flags:
     * {@code --port N --host H --db URL --db-user U --db-password P --demo --demo-dir DIR}.
     * Environment: {@code EIGENCOV_PORT, EIGENCOV_HOST, EIGENCOV_DB_URL, EIGENCOV_DB_USER,
     * EIGENCOV_DB_PASSWORD, EIGENCOV_DB_POOL_SIZE, EIGENCOV_DEMO, EIGENCOV_DEMO_DIR,
     * EIGENCOV_API_KEYS, EIGENCOV_MAX_BODY_BYTES, EIGENCOV_MAX_ABS_RETURN, EIGENCOV_SHUTDOWN_GRACE_MS,
     * EIGENCOV_SLOW_REQUEST_MS}.
     */
    public static AppConfig fromArgs(List<String> args, Map<String, String> env) {
        Map<String, String> v = new LinkedHashMap<>();
        env.forEach((k, val) -> {
            if (k.startsWith("EIGENCOV_")) v.put(k.substring("EIGENCOV_".length()).toLowerCase(Locale.ROOT).replace('_', '-'), val);
        });
        v.put("db", v.getOrDefault("db-url", null));
        v.remove("db-url");
        for (int i = 0; i < args.size(); i++) {
            String a = args.get(i);
            if (!a.startsWith("--")) throw new ConfigException("unexpected argument '" + a + "'");
            String key = a.substring(2);
            String value;
            int eq = key.indexOf('=');
            if (eq >= 0) {
                value = key.substring(eq + 1);
                key = key.substring(0, eq);
            } else if (key.equals("demo")) {
                value = "true";
            } else {
                if (i + 1 >= args.size()) throw new ConfigException("flag --" + key + " needs a value");
                value = args.get(++i);
            }
            if (!KNOWN.contains(key)) throw new ConfigException("unknown flag --" + key + " (known: --" + String.join(", --", KNOWN) + ")");
            v.put(key, value);
        }
        AppConfig d = defaults();
        return new AppConfig(
                intValue(v, "port", d.port()),
                v.get("host"),
                v.get("db") == null ? d.dbUrl() : v.get("db"),
                v.getOrDefault("db-user", ""),
                v.getOrDefault("db-password", ""),
                intValue(v, "db-pool-size", d.dbPoolSize()),
                Boolean.parseBoolean(v.getOrDefault("demo", "false")),
                v.get("demo-dir") == null ? d.demoDir() : Path.of(v.get("demo-dir")),
                v.getOrDefault("api-keys", ""),
                longValue(v, "max-body-bytes", d.maxBodyBytes()),
                doubleValue(v, "max-abs-return", d.maxAbsReturn()),
                longValue(v, "shutdown-grace-ms", d.shutdownGraceMs()),
                longValue(v, "slow-request-ms", d.slowRequestMs()));
    }

    private static final List<String> KNOWN = List.of("port", "host", "db", "db-user", "db-password", "db-pool-size",
            "demo", "demo-dir", "api-keys", "max-body-bytes", "max-abs-return", "shutdown-grace-ms",
            "slow-request-ms");

    private static int intValue(Map<String, String> v, String key, int def) {
        String s = v.get(key);
        if (s == null || s.isBlank()) return def;
        try {
            return Integer.parseInt(s.trim());
        } catch (NumberFormatException e) {
            throw new ConfigException(key + " must be a whole number, was '" + s + "'");
        }
    }

    private static long longValue(Map<String, String> v, String key, long def) {
        String s = v.get(key);
        if (s == null || s.isBlank()) return def;
        try {
            return Long.parseLong(s.trim());
        } catch (NumberFormatException e) {
            throw new ConfigException(key + " must be a whole number, was '" + s + "'");
        }
    }

    private static double doubleValue(Map<String, String> v, String key, double def) {
        String s = v.get(key);
        if (s == null || s.isBlank()) return def;
        try {
            return Double.parseDouble(s.trim());
        } catch (NumberFormatException e) {
            throw new ConfigException(key + " must be a number, was '" + s + "'");
        }
    }

    /** A configuration value is out of range or unparsable; the message names the key and the limit. */
    public static final class ConfigException extends RuntimeException {
        public ConfigException(String message) {
            super(message);
        }
    }
}
