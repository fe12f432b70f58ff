package eigencov.store;

import com.zaxxer.hikari.HikariConfig;
import com.zaxxer.hikari.HikariDataSource;
import com.zaxxer.hikari.metrics.MetricsTrackerFactory;

import javax.sql.DataSource;
import java.sql.Connection;
import java.sql.SQLException;

/**
 * The relational store: a HikariCP pool over H2 (embedded default) or PostgreSQL, with the schema
 * brought up to date by {@link Migrations} when it opens.
 */
public final class Database implements AutoCloseable {

    /** Which SQL dialect the URL points at; the few statements that differ branch on this. */
    public enum Dialect { H2, POSTGRESQL }

    /** How long a statement waits for a row lock held by another transaction. */
    static final int LOCK_TIMEOUT_MS = 60_000;

    private final HikariDataSource pool;
    private final Dialect dialect;

    private Database(HikariDataSource pool, Dialect dialect) {
        this.pool = pool;
        this.dialect = dialect;
    }

    /**
     * Opens the pool and applies pending migrations.
     *
     * @throws StoreException when the database cannot be reached or a migration fails
     */
    public static Database open(String jdbcUrl, String user, String password, int maxPoolSize) {
        return open(jdbcUrl, user, password, maxPoolSize, null);
    }

    /** As above, reporting pool usage to {@code poolMetrics} (null: none). */
    public static Database open(String jdbcUrl, String user, String password, int maxPoolSize, MetricsTrackerFactory poolMetrics) {
        Dialect dialect = dialectOf(jdbcUrl);
        HikariConfig cfg = new HikariConfig();
        cfg.setJdbcUrl(jdbcUrl);
        if (!user.isEmpty()) cfg.setUsername(user);
        if (!password.isEmpty()) cfg.setPassword(password);
        cfg.setMaximumPoolSize(maxPoolSize);
        cfg.setPoolName("eigencov-db");
        cfg.setAutoCommit(true);
        // Fail fast at start-up, but let the pool come back by itself after an outage.
        cfg.setInitializationFailTimeout(10_000);
        cfg.setConnectionTimeout(5_000);
        cfg.setValidationTimeout(2_000);
        if (poolMetrics != null) cfg.setMetricsTrackerFactory(poolMetrics);
        if (dialect == Dialect.H2) {
            // H2 waits only 1 s for a row lock by default; an upload serialised behind another
            // upload into the same panel must wait for it instead of failing.
            cfg.setConnectionInitSql("SET LOCK_TIMEOUT " + LOCK_TIMEOUT_MS);
        }
        HikariDataSource ds;
        try {
            ds = new HikariDataSource(cfg);
        } catch (RuntimeException e) {
            throw new StoreException("cannot open database " + jdbcUrl.replaceAll("(?i)(password=)[^&;]*", "$1****") + ": " + e.getMessage(), e);
        }
        Database db = new Database(ds, dialect);
        try {
            new Migrations(ds, dialect).migrate();
        } catch (RuntimeException e) {
            ds.close();
            throw e;
        }
        return db;
    }

    static Dialect dialectOf(String jdbcUrl) {
        if (jdbcUrl.startsWith("jdbc:h2:")) return Dialect.H2;
        if (jdbcUrl.startsWith("jdbc:postgresql:")) return Dialect.POSTGRESQL;
        throw new StoreException("unsupported database URL (H2 or PostgreSQL expected): " + jdbcUrl, null);
    }

    public DataSource dataSource() {
        return pool;
    }

    public Dialect dialect() {
        return dialect;
    }

    /** True when a connection can be had and answers a trivial query within two seconds. */
    public boolean isReachable() {
        try (Connection c = pool.getConnection()) {
            return c.isValid(2);
        } catch (SQLException | RuntimeException e) {
            return false;
        }
    }

    /** Pool figures for /metrics: active, idle, total, waiting threads. */
    public int[] poolUsage() {
        var mx = pool.getHikariPoolMXBean();
        if (mx == null) return new int[] {0, 0, 0, 0};
        return new int[] {mx.getActiveConnections(), mx.getIdleConnections(), mx.getTotalConnections(), mx.getThreadsAwaitingConnection()};
    }

    @Override
    public void close() {
        pool.close();
    }
}
