package eigencov.store;

import javax.sql.DataSource;
import java.sql.Connection;
import java.sql.PreparedStatement;
import java.sql.ResultSet;
import java.sql.SQLException;
import java.util.Optional;
import java.util.concurrent.ConcurrentHashMap;

/**
 * Cluster-wide exclusive claims on a model's scheduled refit (or, from {@link #forJobs}, on a stored
 * job), so that of several instances sharing one database exactly one runs it.
 *
 * <p>On PostgreSQL a claim is a session advisory lock ({@code pg_try_advisory_lock(ns, modelId)})
 * on a connection kept for as long as the claim is held. If the holder dies, PostgreSQL ends its
 * session and the lock goes with it, so a refit interrupted by a crash is free for the next
 * instance; nothing needs to expire. On H2 (one process per database file) a claim is an
 * in-process lock per model.
 *
 * <p>A claim says only "nobody else runs this now". Whether the refit is still due must be
 * checked again after claiming: another instance may have finished it a moment before.
 */
public final class RefitLocks {
    /** First key of the two-key advisory lock: "ECOV" in ASCII, so our locks are easy to spot in pg_locks. */
    static final int NAMESPACE = 0x45434F56;
    /** First key of the job claims: "ECOJ". */
    static final int JOB_NAMESPACE = 0x45434F4A;

    private final DataSource ds;
    private final int namespace;
    /** What a claim is on, for messages. */
    private final String what;
    private final Database.Dialect dialect;
    /** H2: the claims held in this process, each by its token (not reentrant: a second claim on a held model fails). */
    private final ConcurrentHashMap<Long, Object> local = new ConcurrentHashMap<>();

    /** Claims on models' refits. */
    public RefitLocks(Database db) {
        this(db, NAMESPACE, "the refit of model");
    }

    private RefitLocks(Database db, int namespace, String what) {
        this.ds = db.dataSource();
        this.dialect = db.dialect();
        this.namespace = namespace;
        this.what = what;
    }

    /**
     * Claims on stored jobs (keyed by job id, in a namespace of their own): the holder runs the job;
     * when it dies, the job is free for the next instance to resume.
     */
    public static RefitLocks forJobs(Database db) {
        return new RefitLocks(db, JOB_NAMESPACE, "job");
    }

    /** A held claim; closing it releases the claim. */
    public interface Claim extends AutoCloseable {
        @Override
        void close();
    }

    /**
     * Claims the refit of model {@code modelId} (or the job of that id, for {@link #forJobs} claims) without waiting.
     *
     * @return the claim, or empty when another holder has it
     * @throws StoreException when the database cannot be asked
     */
    public Optional<Claim> tryClaim(long modelId) {
        if (modelId < 0 || modelId > Integer.MAX_VALUE) throw new IllegalArgumentException("id out of range: " + modelId);
        return dialect == Database.Dialect.POSTGRESQL ? tryAdvisory((int) modelId) : tryLocal(modelId);
    }

    private Optional<Claim> tryLocal(long modelId) {
        Object token = new Object();
        if (local.putIfAbsent(modelId, token) != null) return Optional.empty();
        return Optional.of(() -> local.remove(modelId, token));
    }

    private Optional<Claim> tryAdvisory(int modelId) {
        Connection c = null;
        try {
            c = ds.getConnection();
            c.setAutoCommit(true);
            boolean won;
            try (PreparedStatement p = c.prepareStatement("SELECT pg_try_advisory_lock(?, ?)")) {
                p.setInt(1, namespace);
                p.setInt(2, modelId);
                try (ResultSet rs = p.executeQuery()) {
                    rs.next();
                    won = rs.getBoolean(1);
                }
            }
            if (!won) {
                c.close();
                return Optional.empty();
            }
            return Optional.of(new AdvisoryClaim(c, namespace, modelId));
        } catch (SQLException e) {
            closeQuietly(c);
            throw new StoreException("cannot claim " + what + " " + modelId + ": " + e.getMessage(), e);
        }
    }

    private static final class AdvisoryClaim implements Claim {
        private final Connection c;
        private final int namespace;
        private final int modelId;
        private boolean closed;

        AdvisoryClaim(Connection c, int namespace, int modelId) {
            this.c = c;
            this.namespace = namespace;
            this.modelId = modelId;
        }

        @Override
        public synchronized void close() {
            if (closed) return;
            closed = true;
            try (PreparedStatement p = c.prepareStatement("SELECT pg_advisory_unlock(?, ?)")) {
                p.setInt(1, namespace);
                p.setInt(2, modelId);
                p.execute();
            } catch (SQLException e) {
                // The session is gone (database restarted or connection lost): so is its lock.
                // Evict the connection from the pool so a pooled session never keeps a stale lock.
                abort(c);
            } finally {
                closeQuietly(c);
            }
        }
    }

    private static void abort(Connection c) {
        try {
            c.abort(Runnable::run);
        } catch (SQLException | RuntimeException ignored) {
            // closing below is all that is left to do
        }
    }

    private static void closeQuietly(Connection c) {
        if (c == null) return;
        try {
            c.close();
        } catch (SQLException ignored) {
            // the claim is released either way once the session ends
        }
    }
}
