package eigencov.store;

import javax.sql.DataSource;
import java.sql.Connection;
import java.sql.PreparedStatement;
import java.sql.ResultSet;
import java.sql.SQLException;
import java.sql.Types;
import java.time.Instant;
import java.util.ArrayList;
import java.util.List;
import java.util.Optional;

/**
 * Stored jobs (table {@code job}). Every change of state is a compare-and-set on the state, so a job
 * cancelled while it runs stays cancelled: the runner's next progress write finds it so and stops.
 */
public final class JobRepository {
    private static final String COLUMNS = "id, kind, state, request_json, result_json, done, total, created_at, started_at, "
            + "finished_at, eta_at, error";
    private static final String BRIEF = "id, kind, state, request_json, NULL, done, total, created_at, started_at, "
            + "finished_at, eta_at, error";
    private static final String UNFINISHED = "('" + JobRow.QUEUED + "', '" + JobRow.RUNNING + "')";

    private final DataSource ds;

    public JobRepository(DataSource ds) {
        this.ds = ds;
    }

    /** Stores a new queued job. */
    public JobRow insert(String kind, String requestJson, String resultJson, int total, Instant now) {
        try (Connection c = ds.getConnection();
             PreparedStatement p = c.prepareStatement("INSERT INTO job (kind, state, request_json, result_json, done, total, created_at) "
                     + "VALUES (?, ?, ?, ?, 0, ?, ?)", new String[] {"id"})) {
            p.setString(1, kind);
            p.setString(2, JobRow.QUEUED);
            p.setString(3, requestJson);
            p.setString(4, resultJson);
            p.setInt(5, total);
            p.setObject(6, ModelRepository.utc(now));
            p.executeUpdate();
            long id;
            try (ResultSet keys = p.getGeneratedKeys()) {
                keys.next();
                id = keys.getLong(1);
            }
            return find(c, id, COLUMNS).orElseThrow();
        } catch (SQLException e) {
            throw new StoreException("cannot store a " + kind + " job: " + e.getMessage(), e);
        }
    }

    public Optional<JobRow> find(long id) {
        try (Connection c = ds.getConnection()) {
            return find(c, id, COLUMNS);
        } catch (SQLException e) {
            throw new StoreException("cannot read job " + id + ": " + e.getMessage(), e);
        }
    }

    /** The job's state, or empty when there is no such job. */
    public Optional<String> state(long id) {
        try (Connection c = ds.getConnection(); PreparedStatement p = c.prepareStatement("SELECT state FROM job WHERE id = ?")) {
            p.setLong(1, id);
            try (ResultSet rs = p.executeQuery()) {
                return rs.next() ? Optional.of(rs.getString(1)) : Optional.empty();
            }
        } catch (SQLException e) {
            throw new StoreException("cannot read job " + id + ": " + e.getMessage(), e);
        }
    }

    /** Jobs newest first (by id), of one kind or (null) all, without their results; at most {@code limit}. */
    public List<JobRow> list(String kind, int limit) {
        String sql = "SELECT " + BRIEF + " FROM job" + (kind == null ? "" : " WHERE kind = ?") + " ORDER BY id DESC FETCH FIRST "
                + limit + " ROWS ONLY";
        try (Connection c = ds.getConnection(); PreparedStatement p = c.prepareStatement(sql)) {
            if (kind != null) p.setString(1, kind);
            return read(p);
        } catch (SQLException e) {
            throw new StoreException("cannot list jobs: " + e.getMessage(), e);
        }
    }

    /** Ids of queued and running jobs, oldest first. */
    public List<Long> unfinished() {
        try (Connection c = ds.getConnection();
             PreparedStatement p = c.prepareStatement("SELECT id FROM job WHERE state IN " + UNFINISHED + " ORDER BY id")) {
            List<Long> out = new ArrayList<>();
            try (ResultSet rs = p.executeQuery()) {
                while (rs.next()) out.add(rs.getLong(1));
            }
            return out;
        } catch (SQLException e) {
            throw new StoreException("cannot list unfinished jobs: " + e.getMessage(), e);
        }
    }

    /**
     * Marks an unfinished job running (first start, or a resume after its instance stopped), keeping
     * its first start time and forgetting the old estimate.
     *
     * @return false when the job is finished (or gone)
     */
    public boolean start(long id, Instant now) {
        return update("UPDATE job SET state = '" + JobRow.RUNNING + "', started_at = COALESCE(started_at, ?), eta_at = NULL "
                + "WHERE id = ? AND state IN " + UNFINISHED, p -> {
            p.setObject(1, ModelRepository.utc(now));
            p.setLong(2, id);
        });
    }

    /**
     * Records progress of a running job.
     *
     * @param resultJson the result so far, or null to keep the stored one
     * @param etaAt      the expected end, or null
     * @return false when the job is no longer running (cancelled): the runner stops
     */
    public boolean progress(long id, int done, String resultJson, Instant etaAt) {
        String sql = "UPDATE job SET done = ?, eta_at = ?" + (resultJson == null ? "" : ", result_json = ?") + " WHERE id = ? AND state = '"
                + JobRow.RUNNING + "'";
        return update(sql, p -> {
            p.setInt(1, done);
            if (etaAt == null) p.setNull(2, Types.TIMESTAMP_WITH_TIMEZONE);
            else p.setObject(2, ModelRepository.utc(etaAt));
            int i = 3;
            if (resultJson != null) p.setString(i++, resultJson);
            p.setLong(i, id);
        });
    }

    /**
     * Ends a running job as {@link JobRow#DONE} (progress set to its total) or {@link JobRow#FAILED}.
     *
     * @param resultJson the final result, or null to keep the stored one
     * @return false when the job was no longer running (cancelled meanwhile)
     */
    public boolean finish(long id, String state, String resultJson, String error, Instant now) {
        if (!JobRow.DONE.equals(state) && !JobRow.FAILED.equals(state)) throw new IllegalArgumentException("a job ends done or failed, not " + state);
        String sql = "UPDATE job SET state = ?, finished_at = ?, eta_at = NULL, error = ?"
                + (JobRow.DONE.equals(state) ? ", done = total" : "") + (resultJson == null ? "" : ", result_json = ?")
                + " WHERE id = ? AND state = '" + JobRow.RUNNING + "'";
        return update(sql, p -> {
            p.setString(1, state);
            p.setObject(2, ModelRepository.utc(now));
            p.setString(3, error == null ? null : (error.length() > 2000 ? error.substring(0, 2000) : error));
            int i = 4;
            if (resultJson != null) p.setString(i++, resultJson);
            p.setLong(i, id);
        });
    }

    /** What a cancel found. */
    public enum Cancel { CANCELLED, FINISHED, NOT_FOUND }

    /** Cancels a queued or running job; the work it stored stays. */
    public Cancel cancel(long id, Instant now) {
        boolean won = update("UPDATE job SET state = '" + JobRow.CANCELLED + "', finished_at = ?, eta_at = NULL WHERE id = ? AND state IN "
                + UNFINISHED, p -> {
            p.setObject(1, ModelRepository.utc(now));
            p.setLong(2, id);
        });
        if (won) return Cancel.CANCELLED;
        return find(id).isPresent() ? Cancel.FINISHED : Cancel.NOT_FOUND;
    }

    /** Jobs by state and kind. */
    public record Count(String state, String kind, long jobs) {
    }

    public List<Count> counts() {
        try (Connection c = ds.getConnection();
             PreparedStatement p = c.prepareStatement("SELECT state, kind, COUNT(*) FROM job GROUP BY state, kind")) {
            List<Count> out = new ArrayList<>();
            try (ResultSet rs = p.executeQuery()) {
                while (rs.next()) out.add(new Count(rs.getString(1), rs.getString(2), rs.getLong(3)));
            }
            return out;
        } catch (SQLException e) {
            throw new StoreException("cannot count jobs: " + e.getMessage(), e);
        }
    }

    private interface Binder {
        void bind(PreparedStatement p) throws SQLException;
    }

    private boolean update(String sql, Binder binder) {
        try (Connection c = ds.getConnection(); PreparedStatement p = c.prepareStatement(sql)) {
            binder.bind(p);
            return p.executeUpdate() == 1;
        } catch (SQLException e) {
            throw new StoreException("cannot update a job: " + e.getMessage(), e);
        }
    }

    private static Optional<JobRow> find(Connection c, long id, String columns) throws SQLException {
        try (PreparedStatement p = c.prepareStatement("SELECT " + columns + " FROM job WHERE id = ?")) {
            p.setLong(1, id);
            return read(p).stream().findFirst();
        }
    }

    private static List<JobRow> read(PreparedStatement p) throws SQLException {
        List<JobRow> out = new ArrayList<>();
        try (ResultSet rs = p.executeQuery()) {
            while (rs.next()) {
                out.add(new JobRow(rs.getLong(1), rs.getString(2), rs.getString(3), rs.getString(4), rs.getString(5), rs.getInt(6),
                        rs.getInt(7), ModelRepository.instant(rs, 8), ModelRepository.instant(rs, 9), ModelRepository.instant(rs, 10),
                        ModelRepository.instant(rs, 11), rs.getString(12)));
            }
        }
        return out;
    }
}
