package eigencov.store;

import javax.sql.DataSource;
import java.sql.Connection;
import java.sql.PreparedStatement;
import java.sql.ResultSet;
import java.sql.SQLException;
import java.sql.Statement;
import java.sql.Types;
import java.time.Instant;
import java.time.OffsetDateTime;
import java.time.ZoneOffset;
import java.util.ArrayList;
import java.util.List;
import java.util.Optional;

/** Model specs (table {@code model}, history in {@code model_spec_version}) and the refit claim. */
public final class ModelRepository {
    private static final String COLUMNS = "id, name, panel, spec_json, version, refit_every_seconds, refit_on_ingest, "
            + "created_at, updated_at, last_refit_at";

    private final DataSource ds;

    public ModelRepository(DataSource ds) {
        this.ds = ds;
    }

    /** The spec fields the store indexes on; the whole spec travels as JSON text. */
    public record SpecData(String panel, String specJson, Long refitEverySeconds, boolean refitOnIngest) {
    }

    public Optional<ModelRow> find(String name) {
        try (Connection c = ds.getConnection();
             PreparedStatement p = c.prepareStatement("SELECT " + COLUMNS + " FROM model WHERE name = ?")) {
            p.setString(1, name);
            try (ResultSet rs = p.executeQuery()) {
                return rs.next() ? Optional.of(row(rs)) : Optional.empty();
            }
        } catch (SQLException e) {
            throw new StoreException("cannot read model " + name + ": " + e.getMessage(), e);
        }
    }

    /** All models, by name. */
    public List<ModelRow> list() {
        try (Connection c = ds.getConnection();
             Statement s = c.createStatement();
             ResultSet rs = s.executeQuery("SELECT " + COLUMNS + " FROM model ORDER BY name")) {
            List<ModelRow> out = new ArrayList<>();
            while (rs.next()) out.add(row(rs));
            return out;
        } catch (SQLException e) {
            throw new StoreException("cannot list models: " + e.getMessage(), e);
        }
    }

    /**
     * Creates the model (version 1) or replaces its spec (version + 1), recording the version in the
     * history, in one transaction.
     *
     * @return the stored row
     */
    public ModelRow put(String name, SpecData spec, Instant now) {
        try (Connection c = ds.getConnection()) {
            c.setAutoCommit(false);
            try {
                Optional<ModelRow> existing = findForUpdate(c, name);
                long id;
                int version;
                if (existing.isPresent()) {
                    id = existing.get().id();
                    version = existing.get().version() + 1;
                    try (PreparedStatement p = c.prepareStatement("UPDATE model SET panel = ?, spec_json = ?, version = ?, "
                            + "refit_every_seconds = ?, refit_on_ingest = ?, updated_at = ? WHERE id = ?")) {
                        bindSpec(p, 1, spec);
                        p.setInt(3, version);
                        p.setObject(6, utc(now));
                        p.setLong(7, id);
                        p.executeUpdate();
                    }
                } else {
                    version = 1;
                    try (PreparedStatement p = c.prepareStatement("INSERT INTO model (panel, spec_json, version, refit_every_seconds, "
                            + "refit_on_ingest, created_at, updated_at, name) VALUES (?, ?, ?, ?, ?, ?, ?, ?)", new String[] {"id"})) {
                        bindSpec(p, 1, spec);
                        p.setInt(3, version);
                        p.setObject(6, utc(now));
                        p.setObject(7, utc(now));
                        p.setString(8, name);
                        p.executeUpdate();
                        try (ResultSet keys = p.getGeneratedKeys()) {
                            keys.next();
                            id = keys.getLong(1);
                        }
                    }
                }
                try (PreparedStatement p = c.prepareStatement(
                        "INSERT INTO model_spec_version (model_id, version, spec_json, created_at) VALUES (?, ?, ?, ?)")) {
                    p.setLong(1, id);
                    p.setInt(2, version);
                    p.setString(3, spec.specJson());
                    p.setObject(4, utc(now));
                    p.executeUpdate();
                }
                ModelRow stored = findForUpdate(c, name).orElseThrow();
                c.commit();
                return stored;
            } catch (SQLException | RuntimeException e) {
                c.rollback();
                throw e;
            }
        } catch (SQLException e) {
            throw new StoreException("cannot store model " + name + ": " + e.getMessage(), e);
        }
    }

    /** Deletes the model with its spec history and fits; false when it did not exist. */
    public boolean delete(String name) {
        try (Connection c = ds.getConnection();
             PreparedStatement p = c.prepareStatement("DELETE FROM model WHERE name = ?")) {
            p.setString(1, name);
            return p.executeUpdate() > 0;
        } catch (SQLException e) {
            throw new StoreException("cannot delete model " + name + ": " + e.getMessage(), e);
        }
    }

    /**
     * The one place a scheduled refit is claimed: sets {@code last_refit_at} to {@code now} only if it
     * still holds {@code seen} (compare-and-set), so of several instances sharing the store exactly
     * one wins a given run.
     *
     * @return true when this caller owns the run
     */
    public boolean claimRefit(long modelId, Instant seen, Instant now) {
        String sql = "UPDATE model SET last_refit_at = ? WHERE id = ? AND "
                + (seen == null ? "last_refit_at IS NULL" : "last_refit_at = ?");
        try (Connection c = ds.getConnection(); PreparedStatement p = c.prepareStatement(sql)) {
            p.setObject(1, utc(now));
            p.setLong(2, modelId);
            if (seen != null) p.setObject(3, utc(seen));
            return p.executeUpdate() == 1;
        } catch (SQLException e) {
            throw new StoreException("cannot claim refit of model " + modelId + ": " + e.getMessage(), e);
        }
    }

    private static Optional<ModelRow> findForUpdate(Connection c, String name) throws SQLException {
        try (PreparedStatement p = c.prepareStatement("SELECT " + COLUMNS + " FROM model WHERE name = ? FOR UPDATE")) {
            p.setString(1, name);
            try (ResultSet rs = p.executeQuery()) {
                return rs.next() ? Optional.of(row(rs)) : Optional.empty();
            }
        }
    }

    private static void bindSpec(PreparedStatement p, int first, SpecData spec) throws SQLException {
        p.setString(first, spec.panel());
        p.setString(first + 1, spec.specJson());
        if (spec.refitEverySeconds() == null) p.setNull(first + 3, Types.BIGINT);
        else p.setLong(first + 3, spec.refitEverySeconds());
        p.setBoolean(first + 4, spec.refitOnIngest());
    }

    private static ModelRow row(ResultSet rs) throws SQLException {
        long every = rs.getLong(6);
        Long refit = rs.wasNull() ? null : every;
        return new ModelRow(rs.getLong(1), rs.getString(2), rs.getString(3), rs.getString(4), rs.getInt(5), refit,
                rs.getBoolean(7), instant(rs, 8), instant(rs, 9), instant(rs, 10));
    }

    static OffsetDateTime utc(Instant t) {
        return t.atOffset(ZoneOffset.UTC);
    }

    static Instant instant(ResultSet rs, int col) throws SQLException {
        OffsetDateTime t = rs.getObject(col, OffsetDateTime.class);
        return t == null ? null : t.toInstant();
    }
}
