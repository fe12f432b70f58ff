package eigencov.store;

import eigencov.math.ShortHistory;

import javax.sql.DataSource;
import java.sql.Connection;
import java.sql.Date;
import java.sql.PreparedStatement;
import java.sql.ResultSet;
import java.sql.SQLException;
import java.sql.Types;
import java.time.Instant;
import java.time.LocalDate;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;

/**
 * Fit attempts (table {@code fit}) and the stored models of ok fits ({@code fit_data}). An ok fit is
 * written in one transaction, row and data together, so a reader never sees half of it.
 */
public final class FitRepository {
    private static final String COLUMNS = "f.id, m.name, f.status, f.origin, f.as_of, f.created_at, f.spec_version, f.spec_json, "
            + "f.reason, f.factors, f.tickers, f.dates, f.window_from, f.window_to, f.load_ms, f.compute_ms, f.store_ms";
    private static final String FROM = " FROM fit f JOIN model m ON m.id = f.model_id ";
    /** f is the newest ok fit of its model: no ok fit of the same model has a later asOf (ties: higher id). */
    private static final String NEWEST = " f.status = 'ok' AND NOT EXISTS (SELECT 1 FROM fit g WHERE g.model_id = f.model_id "
            + "AND g.status = 'ok' AND (g.as_of > f.as_of OR (g.as_of = f.as_of AND g.id > f.id))) ";

    private final DataSource ds;

    public FitRepository(DataSource ds) {
        this.ds = ds;
    }

    /**
     * What a new attempt states about itself before it is stored.
     *
     * @param jobId the job that makes it (a range backfill, an evaluation), or null
     */
    public record Attempt(long modelId, String origin, LocalDate asOf, Instant createdAt, int specVersion, String specJson, Long jobId) {
        /** An attempt outside any job. */
        public Attempt(long modelId, String origin, LocalDate asOf, Instant createdAt, int specVersion, String specJson) {
            this(modelId, origin, asOf, createdAt, specVersion, specJson, null);
        }
    }

    /** One attempt at a date, as a job resuming or skipping work needs it. */
    public record Mark(long fitId, String status, int specVersion, Long jobId, String reason) {
        public boolean ok() {
            return FitRow.OK.equals(status);
        }
    }

    /** Figures of an ok fit, stored with its row. */
    public record Figures(int factors, int tickers, int dates, LocalDate windowFrom, LocalDate windowTo, long loadMs, long computeMs) {
    }

    /**
     * Stores an ok fit, row and data, in one transaction. {@code store_ms} is the time spent writing
     * before the commit.
     *
     * @return the stored row
     */
    public FitRow insertOk(Attempt a, Figures f, FitData d) {
        long start = System.nanoTime();
        try (Connection c = ds.getConnection()) {
            c.setAutoCommit(false);
            try {
                long id = insertRow(c, a, FitRow.OK, null, f);
                try (PreparedStatement p = c.prepareStatement("INSERT INTO fit_data (fit_id, universe, window_dates, exposures, "
                        + "factor_covariance, specific_variances, eigenvalues, variance_share, means, factor_returns, reports_json, "
                        + "variances, short_history_tickers, short_history_observations, short_history_exposures, "
                        + "short_history_specific) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)")) {
                    p.setLong(1, id);
                    p.setString(2, String.join("\n", d.universe()));
                    p.setString(3, joinDates(d.dates()));
                    p.setBytes(4, Float64Blob.encode(d.exposures()));
                    p.setBytes(5, Float64Blob.encode(d.factorCovariance()));
                    p.setBytes(6, Float64Blob.encode(d.specificVariances()));
                    p.setBytes(7, Float64Blob.encode(d.eigenvalues()));
                    p.setBytes(8, Float64Blob.encode(d.varianceShare()));
                    p.setBytes(9, Float64Blob.encode(d.means()));
                    p.setBytes(10, Float64Blob.encode(d.factorReturns()));
                    p.setString(11, d.reportsJson());
                    p.setBytes(12, d.variances() == null ? null : Float64Blob.encode(d.variances()));
                    ShortHistory sh = d.shortHistory();
                    p.setString(13, String.join("\n", sh.tickers()));
                    p.setBytes(14, Int32Blob.encode(sh.observations(), sh.size()));
                    p.setBytes(15, Float64Blob.encode(sh.exposures()));
                    p.setBytes(16, Float64Blob.encode(sh.specificVariances()));
                    p.executeUpdate();
                }
                long storeMs = (System.nanoTime() - start) / 1_000_000;
                try (PreparedStatement p = c.prepareStatement("UPDATE fit SET store_ms = ? WHERE id = ?")) {
                    p.setLong(1, storeMs);
                    p.setLong(2, id);
                    p.executeUpdate();
                }
                FitRow row = find(c, id).orElseThrow();
                c.commit();
                return row;
            } catch (SQLException | RuntimeException e) {
                c.rollback();
                throw e;
            }
        } catch (SQLException e) {
            throw new StoreException("cannot store fit of model " + a.modelId() + ": " + e.getMessage(), e);
        }
    }

    /** Records a failed attempt with its reason (no data). */
    public FitRow insertFailed(Attempt a, String reason, Long loadMs) {
        try (Connection c = ds.getConnection()) {
            String r = reason == null ? "unknown" : (reason.length() > 2000 ? reason.substring(0, 2000) : reason);
            long id = insertRow(c, a, FitRow.FAILED, r, loadMs == null ? null : new Figures(0, 0, 0, null, null, loadMs, 0));
            return find(c, id).orElseThrow();
        } catch (SQLException e) {
            throw new StoreException("cannot record failed fit of model " + a.modelId() + ": " + e.getMessage(), e);
        }
    }

    private static long insertRow(Connection c, Attempt a, String status, String reason, Figures f) throws SQLException {
        try (PreparedStatement p = c.prepareStatement("INSERT INTO fit (model_id, status, origin, as_of, created_at, spec_version, "
                + "spec_json, reason, factors, tickers, dates, window_from, window_to, load_ms, compute_ms, job_id) "
                + "VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)", new String[] {"id"})) {
            p.setLong(1, a.modelId());
            p.setString(2, status);
            p.setString(3, a.origin());
            p.setDate(4, Date.valueOf(a.asOf()));
            p.setObject(5, ModelRepository.utc(a.createdAt()));
            p.setInt(6, a.specVersion());
            p.setString(7, a.specJson());
            p.setString(8, reason);
            boolean ok = FitRow.OK.equals(status);
            setInt(p, 9, ok ? f.factors() : null);
            setInt(p, 10, ok ? f.tickers() : null);
            setInt(p, 11, ok ? f.dates() : null);
            p.setDate(12, ok ? Date.valueOf(f.windowFrom()) : null);
            p.setDate(13, ok ? Date.valueOf(f.windowTo()) : null);
            setLong(p, 14, f == null ? null : f.loadMs());
            setLong(p, 15, ok ? f.computeMs() : null);
            setLong(p, 16, a.jobId());
            p.executeUpdate();
            try (ResultSet keys = p.getGeneratedKeys()) {
                keys.next();
                return keys.getLong(1);
            }
        }
    }

    public Optional<FitRow> find(long id) {
        try (Connection c = ds.getConnection()) {
            return find(c, id);
        } catch (SQLException e) {
            throw new StoreException("cannot read fit " + id + ": " + e.getMessage(), e);
        }
    }

    /** Every attempt of the model, newest first (by creation, then id). */
    public List<FitRow> list(String model) {
        return rows("SELECT " + COLUMNS + FROM + "WHERE m.name = ? ORDER BY f.created_at DESC, f.id DESC", model);
    }

    /** The newest ok fit of the model (latest asOf, then highest id). */
    public Optional<FitRow> newest(String model) {
        return rows("SELECT " + COLUMNS + FROM + "WHERE m.name = ? AND" + NEWEST, model).stream().findFirst();
    }

    /** The latest ok fit of the model with asOf on or before {@code date} (ties: highest id). */
    public Optional<FitRow> latestAsOf(String model, LocalDate date) {
        try (Connection c = ds.getConnection();
             PreparedStatement p = c.prepareStatement("SELECT " + COLUMNS + FROM + "WHERE m.name = ? AND f.status = 'ok' AND f.as_of <= ? "
                     + "ORDER BY f.as_of DESC, f.id DESC FETCH FIRST 1 ROWS ONLY")) {
            p.setString(1, model);
            p.setDate(2, Date.valueOf(date));
            return read(p).stream().findFirst();
        } catch (SQLException e) {
            throw new StoreException("cannot read fits of model " + model + ": " + e.getMessage(), e);
        }
    }

    /** Model name to the id of its newest ok fit, for every model that has one. */
    public Map<String, Long> newestIds() {
        try (Connection c = ds.getConnection();
             PreparedStatement p = c.prepareStatement("SELECT m.name, f.id" + FROM + "WHERE" + NEWEST);
             ResultSet rs = p.executeQuery()) {
            Map<String, Long> out = new LinkedHashMap<>();
            while (rs.next()) out.put(rs.getString(1), rs.getLong(2));
            return out;
        } catch (SQLException e) {
            throw new StoreException("cannot read newest fits: " + e.getMessage(), e);
        }
    }

    /** Creation time of the model's newest attempt (ok or failed), or empty. */
    public Optional<Instant> lastAttemptAt(long modelId) {
        try (Connection c = ds.getConnection();
             PreparedStatement p = c.prepareStatement("SELECT MAX(created_at) FROM fit WHERE model_id = ?")) {
            p.setLong(1, modelId);
            try (ResultSet rs = p.executeQuery()) {
                rs.next();
                return Optional.ofNullable(ModelRepository.instant(rs, 1));
            }
        } catch (SQLException e) {
            throw new StoreException("cannot read fits of model " + modelId + ": " + e.getMessage(), e);
        }
    }

    /**
     * Every attempt of the model at each of {@code asOfs} (ascending by id within a date), in one read.
     *
     * @return date -> attempts; dates without any attempt are absent
     */
    public Map<LocalDate, List<Mark>> attemptsAt(long modelId, List<LocalDate> asOfs) {
        Map<LocalDate, List<Mark>> out = new LinkedHashMap<>();
        if (asOfs.isEmpty()) return out;
        LocalDate from = asOfs.stream().min(LocalDate::compareTo).orElseThrow();
        LocalDate to = asOfs.stream().max(LocalDate::compareTo).orElseThrow();
        java.util.Set<LocalDate> wanted = new java.util.HashSet<>(asOfs);
        try (Connection c = ds.getConnection();
             PreparedStatement p = c.prepareStatement("SELECT id, as_of, status, spec_version, job_id, reason FROM fit "
                     + "WHERE model_id = ? AND as_of BETWEEN ? AND ? ORDER BY as_of, id")) {
            p.setLong(1, modelId);
            p.setDate(2, Date.valueOf(from));
            p.setDate(3, Date.valueOf(to));
            try (ResultSet rs = p.executeQuery()) {
                while (rs.next()) {
                    LocalDate d = rs.getDate(2).toLocalDate();
                    if (!wanted.contains(d)) continue;
                    out.computeIfAbsent(d, k -> new ArrayList<>()).add(new Mark(rs.getLong(1), rs.getString(3), rs.getInt(4),
                            longOrNull(rs, 5), rs.getString(6)));
                }
            }
            return out;
        } catch (SQLException e) {
            throw new StoreException("cannot read fits of model " + modelId + ": " + e.getMessage(), e);
        }
    }

    /** The universe of an ok fit, without its arrays. */
    public Optional<List<String>> universe(long fitId) {
        try (Connection c = ds.getConnection();
             PreparedStatement p = c.prepareStatement("SELECT universe FROM fit_data WHERE fit_id = ?")) {
            p.setLong(1, fitId);
            try (ResultSet rs = p.executeQuery()) {
                if (!rs.next()) return Optional.empty();
                String universe = rs.getString(1);
                return Optional.of(universe.isEmpty() ? List.of() : Arrays.asList(universe.split("\n")));
            }
        } catch (SQLException e) {
            throw new StoreException("cannot read fit " + fitId + ": " + e.getMessage(), e);
        }
    }

    /** The stored model of an ok fit. */
    public Optional<FitData> data(long fitId) {
        try (Connection c = ds.getConnection();
             PreparedStatement p = c.prepareStatement("SELECT d.universe, d.window_dates, f.factors, d.exposures, d.factor_covariance, "
                     + "d.specific_variances, d.eigenvalues, d.variance_share, d.means, d.factor_returns, d.reports_json, "
                     + "d.variances, d.short_history_tickers, d.short_history_observations, d.short_history_exposures, "
                     + "d.short_history_specific FROM fit_data d JOIN fit f ON f.id = d.fit_id WHERE d.fit_id = ?")) {
            p.setLong(1, fitId);
            try (ResultSet rs = p.executeQuery()) {
                if (!rs.next()) return Optional.empty();
                int factors = rs.getInt(3);
                byte[] variances = rs.getBytes(12);
                return Optional.of(new FitData(lines(rs.getString(1)), splitDates(rs.getString(2)), factors,
                        Float64Blob.decode(rs.getBytes(4)), Float64Blob.decode(rs.getBytes(5)), Float64Blob.decode(rs.getBytes(6)),
                        Float64Blob.decode(rs.getBytes(7)), Float64Blob.decode(rs.getBytes(8)), Float64Blob.decode(rs.getBytes(9)),
                        Float64Blob.decode(rs.getBytes(10)), rs.getString(11), variances == null ? null : Float64Blob.decode(variances),
                        shortHistory(rs, factors)));
            }
        } catch (SQLException e) {
            throw new StoreException("cannot read fit " + fitId + ": " + e.getMessage(), e);
        }
    }

    private Optional<FitRow> find(Connection c, long id) throws SQLException {
        try (PreparedStatement p = c.prepareStatement("SELECT " + COLUMNS + FROM + "WHERE f.id = ?")) {
            p.setLong(1, id);
            return read(p).stream().findFirst();
        }
    }

    private List<FitRow> rows(String sql, String model) {
        try (Connection c = ds.getConnection(); PreparedStatement p = c.prepareStatement(sql)) {
            p.setString(1, model);
            return read(p);
        } catch (SQLException e) {
            throw new StoreException("cannot read fits of model " + model + ": " + e.getMessage(), e);
        }
    }

    private static List<FitRow> read(PreparedStatement p) throws SQLException {
        List<FitRow> out = new ArrayList<>();
        try (ResultSet rs = p.executeQuery()) {
            while (rs.next()) {
                out.add(new FitRow(rs.getLong(1), rs.getString(2), rs.getString(3), rs.getString(4), rs.getDate(5).toLocalDate(),
                        ModelRepository.instant(rs, 6), rs.getInt(7), rs.getString(8), rs.getString(9), intOrNull(rs, 10),
                        intOrNull(rs, 11), intOrNull(rs, 12), dateOrNull(rs, 13), dateOrNull(rs, 14), longOrNull(rs, 15),
                        longOrNull(rs, 16), longOrNull(rs, 17)));
            }
        }
        return out;
    }

    /** Columns 13-16: the short-history names, none when NULL (a fit stored before V4) or empty. */
    private static ShortHistory shortHistory(ResultSet rs, int factors) throws SQLException {
        List<String> tickers = lines(rs.getString(13));
        if (tickers.isEmpty()) return ShortHistory.NONE;
        byte[] obs = rs.getBytes(14);
        int[] observations = new int[Int32Blob.length(obs)];
        Int32Blob.decode(obs, observations);
        return new ShortHistory(tickers, observations, factors, Float64Blob.decode(rs.getBytes(15)),
                Float64Blob.decode(rs.getBytes(16)));
    }

    /** A newline-joined list; empty for null or "". */
    private static List<String> lines(String joined) {
        return joined == null || joined.isEmpty() ? List.of() : Arrays.asList(joined.split("\n"));
    }

    private static String joinDates(List<LocalDate> dates) {
        StringBuilder sb = new StringBuilder(dates.size() * 11);
        for (LocalDate d : dates) {
            if (sb.length() > 0) sb.append('\n');
            sb.append(d);
        }
        return sb.toString();
    }

    private static List<LocalDate> splitDates(String s) {
        List<LocalDate> out = new ArrayList<>();
        if (s.isEmpty()) return out;
        for (String d : s.split("\n")) out.add(LocalDate.parse(d));
        return out;
    }

    private static void setInt(PreparedStatement p, int i, Integer v) throws SQLException {
        if (v == null) p.setNull(i, Types.INTEGER);
        else p.setInt(i, v);
    }

    private static void setLong(PreparedStatement p, int i, Long v) throws SQLException {
        if (v == null) p.setNull(i, Types.BIGINT);
        else p.setLong(i, v);
    }

    private static Integer intOrNull(ResultSet rs, int i) throws SQLException {
        int v = rs.getInt(i);
        return rs.wasNull() ? null : v;
    }

    private static Long longOrNull(ResultSet rs, int i) throws SQLException {
        long v = rs.getLong(i);
        return rs.wasNull() ? null : v;
    }

    private static LocalDate dateOrNull(ResultSet rs, int i) throws SQLException {
        Date d = rs.getDate(i);
        return d == null ? null : d.toLocalDate();
    }
}
