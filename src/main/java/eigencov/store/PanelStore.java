package eigencov.store;

import eigencov.math.ReturnPanel;
import eigencov.service.NotFoundException;
import eigencov.service.UnavailableException;

import javax.sql.DataSource;
import java.io.IOException;
import java.sql.Connection;
import java.sql.PreparedStatement;
import java.sql.ResultSet;
import java.sql.SQLException;
import java.sql.SQLTransientConnectionException;
import java.time.LocalDate;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Collection;
import java.util.Collections;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.OptionalLong;
import java.util.concurrent.ConcurrentHashMap;

/**
 * Return panels in the relational store: upsert of validated batches, panel summaries, read-back in
 * (date, ticker) order, and the point-in-time window a fit reads.
 *
 * <p>Tables: {@code panel}, {@code ticker} (symbols interned to integer ids, shared by all panels),
 * {@code panel_return(panel_id, obs_date, ticker_id, ret)}, and two indexes kept in step by every
 * upsert, {@code panel_date(panel_id, obs_date, row_count)} and {@code panel_ticker(panel_id, ticker_id)}.
 *
 * <p>Methods naming a panel that does not exist throw {@link NotFoundException}, except
 * {@link #upsert}, which creates it, and {@link #panel}, which answers empty.
 */
public final class PanelStore {
    /** JDBC batch size for updates. */
    private static final int BATCH = 8_192;
    /** Rows fetched per round trip when reading back (PostgreSQL streams only with a fetch size). */
    private static final int FETCH = 10_000;
    /**
     * Most rows one read-back query covers. H2 materialises a whole result before the first row
     * and spills large ones to temporary files (a 1.5M-row window took 15 s as one query), so reads
     * go date range by date range, sized from panel_date.row_count.
     */
    private static final int CHUNK_ROWS = 20_000;
    /** Bound parameters per IN (...) list, well below every driver's limit. */
    private static final int IN_CHUNK = 500;
    private static final int ATTEMPTS = 3;

    private final DataSource ds;
    /** PostgreSQL: rows are streamed with COPY ({@link PgBulkWriter}); H2: JDBC batches. */
    private final boolean copy;
    /** Ticker ids never change once assigned and interning commits on its own, so caching them is safe. */
    private final Map<String, Integer> tickerIds = new ConcurrentHashMap<>();

    public PanelStore(Database db) {
        this.ds = db.dataSource();
        this.copy = db.dialect() == Database.Dialect.POSTGRESQL;
    }

    // ------------------------------------------------------------------ write

    /**
     * Stores every row of {@code batch} in {@code panel} in one transaction (all or nothing),
     * creating the panel if absent: rows whose (date, ticker) is new are inserted, the others get
     * the new value. Concurrent upserts into the same panel are serialised on the panel row.
     */
    public UpsertCounts upsert(String panel, ReturnBatch batch) {
        int[] ids = internTickers(batch.tickers());
        SQLException last = null;
        for (int attempt = 1; attempt <= ATTEMPTS; attempt++) {
            try (Connection c = ds.getConnection()) {
                c.setAutoCommit(false);
                try {
                    long panelId = lockPanel(c, panel);
                    UpsertCounts counts = write(c, panelId, batch, ids, copy);
                    c.commit();
                    return counts;
                } catch (SQLException | RuntimeException e) {
                    c.rollback();
                    throw e;
                } finally {
                    c.setAutoCommit(true);
                }
            } catch (SQLException e) {
                // A concurrent first upsert created the same panel: the next attempt finds it.
                if (!isUniqueViolation(e)) throw failure("upsert into panel " + panel, e);
                last = e;
            }
        }
        throw failure("upsert into panel " + panel, last);
    }

    /** The panel's id, creating the panel if needed, with its row locked until the transaction ends. */
    private static long lockPanel(Connection c, String panel) throws SQLException {
        OptionalLong id = panelId(c, panel);
        if (id.isEmpty()) {
            try (PreparedStatement p = c.prepareStatement("INSERT INTO panel (name) VALUES (?)")) {
                p.setString(1, panel);
                p.executeUpdate();
            }
            id = panelId(c, panel);
        }
        try (PreparedStatement p = c.prepareStatement("SELECT id FROM panel WHERE id = ? FOR UPDATE")) {
            p.setLong(1, id.getAsLong());
            try (ResultSet rs = p.executeQuery()) {
                rs.next();
            }
        }
        return id.getAsLong();
    }

    private static UpsertCounts write(Connection c, long panelId, ReturnBatch b, int[] ids, boolean copy) throws SQLException {
        int nDates = b.dateCount();
        int n = b.size();
        int[] dateStart = new int[nDates + 1];
        for (int r = 0; r < n; r++) dateStart[b.dateIndex(r) + 1]++;
        for (int d = 0; d < nDates; d++) dateStart[d + 1] += dateStart[d];

        boolean[] dateKnown = new boolean[nDates];
        if (nDates > 0) {
            try (PreparedStatement p = c.prepareStatement(
                    "SELECT obs_date FROM panel_date WHERE panel_id = ? AND obs_date >= ? AND obs_date <= ?")) {
                p.setLong(1, panelId);
                p.setObject(2, b.date(0));
                p.setObject(3, b.date(nDates - 1));
                try (ResultSet rs = p.executeQuery()) {
                    List<LocalDate> dates = b.dates();
                    while (rs.next()) {
                        int d = Collections.binarySearch(dates, rs.getObject(1, LocalDate.class));
                        if (d >= 0) dateKnown[d] = true;
                    }
                }
            }
        }

        // Which rows exist already: only dates the panel holds can have them, one short scan each.
        boolean[] exists = new boolean[n];
        int maxId = 0;
        for (int id : ids) maxId = Math.max(maxId, id);
        int[] localOfId = new int[maxId + 1];
        Arrays.fill(localOfId, -1);
        for (int t = 0; t < ids.length; t++) localOfId[ids[t]] = t;
        long updated = 0;
        try (PreparedStatement p = c.prepareStatement("SELECT ticker_id FROM panel_return WHERE panel_id = ? AND obs_date = ?")) {
            for (int d = 0; d < nDates; d++) {
                if (!dateKnown[d]) continue;
                p.setLong(1, panelId);
                p.setObject(2, b.date(d));
                try (ResultSet rs = p.executeQuery()) {
                    while (rs.next()) {
                        int id = rs.getInt(1);
                        int local = id < localOfId.length ? localOfId[id] : -1;
                        if (local < 0) continue;
                        int r = findTicker(b, dateStart[d], dateStart[d + 1], local);
                        if (r >= 0) {
                            exists[r] = true;
                            updated++;
                        }
                    }
                }
            }
        }

        int[] insertedOnDate = new int[nDates];
        if (copy) {
            PgBulkWriter.write(c, panelId, b, ids, exists, insertedOnDate);
        } else {
            // New rows go in one INSERT ... SELECT FROM UNNEST(ids, values) per date: measured on H2 at
            // about twice the rows per CPU-second of a JDBC batch of single-row INSERTs (scripts/bench-ingest).
            try (PreparedStatement ins = c.prepareStatement("INSERT INTO panel_return (panel_id, obs_date, ticker_id, ret) "
                    + "SELECT ?, ?, u.t, u.r FROM UNNEST(?, ?) AS u(t, r)");
                 PreparedStatement upd = c.prepareStatement(
                         "UPDATE panel_return SET ret = ? WHERE panel_id = ? AND obs_date = ? AND ticker_id = ?")) {
                int pendingUpd = 0;
                for (int d = 0; d < nDates; d++) {
                    LocalDate date = b.date(d);
                    int from = dateStart[d];
                    int to = dateStart[d + 1];
                    int fresh = 0;
                    for (int r = from; r < to; r++) if (!exists[r]) fresh++;
                    Integer[] newIds = new Integer[fresh];
                    Double[] newValues = new Double[fresh];
                    int j = 0;
                    for (int r = from; r < to; r++) {
                        int id = ids[b.tickerIndex(r)];
                        if (!exists[r]) {
                            newIds[j] = id;
                            newValues[j++] = b.value(r);
                            continue;
                        }
                        upd.setDouble(1, b.value(r));
                        upd.setLong(2, panelId);
                        upd.setObject(3, date);
                        upd.setInt(4, id);
                        upd.addBatch();
                        if (++pendingUpd == BATCH) {
                            upd.executeBatch();
                            pendingUpd = 0;
                        }
                    }
                    if (fresh > 0) {
                        ins.setLong(1, panelId);
                        ins.setObject(2, date);
                        ins.setArray(3, c.createArrayOf("INTEGER", newIds));
                        ins.setArray(4, c.createArrayOf("DOUBLE PRECISION", newValues));
                        ins.executeUpdate();
                        insertedOnDate[d] = fresh;
                    }
                }
                if (pendingUpd > 0) upd.executeBatch();
            }
        }

        try (PreparedStatement ins = c.prepareStatement("INSERT INTO panel_date (panel_id, obs_date, row_count) VALUES (?, ?, ?)");
             PreparedStatement upd = c.prepareStatement(
                     "UPDATE panel_date SET row_count = row_count + ? WHERE panel_id = ? AND obs_date = ?")) {
            for (int d = 0; d < nDates; d++) {
                if (!dateKnown[d]) {
                    ins.setLong(1, panelId);
                    ins.setObject(2, b.date(d));
                    ins.setInt(3, insertedOnDate[d]);
                    ins.addBatch();
                } else if (insertedOnDate[d] > 0) {
                    upd.setInt(1, insertedOnDate[d]);
                    upd.setLong(2, panelId);
                    upd.setObject(3, b.date(d));
                    upd.addBatch();
                }
            }
            ins.executeBatch();
            upd.executeBatch();
        }

        boolean[] tickerKnown = new boolean[ids.length];
        try (PreparedStatement p = c.prepareStatement("SELECT ticker_id FROM panel_ticker WHERE panel_id = ?")) {
            p.setLong(1, panelId);
            try (ResultSet rs = p.executeQuery()) {
                while (rs.next()) {
                    int id = rs.getInt(1);
                    if (id < localOfId.length && localOfId[id] >= 0) tickerKnown[localOfId[id]] = true;
                }
            }
        }
        try (PreparedStatement p = c.prepareStatement("INSERT INTO panel_ticker (panel_id, ticker_id) VALUES (?, ?)")) {
            for (int t = 0; t < ids.length; t++) {
                if (tickerKnown[t]) continue;
                p.setLong(1, panelId);
                p.setInt(2, ids[t]);
                p.addBatch();
            }
            p.executeBatch();
        }
        return new UpsertCounts(n - updated, updated);
    }

    /** Row in [from, to) of the batch holding ticker {@code local} (rows there ascend by ticker), or -1. */
    private static int findTicker(ReturnBatch b, int from, int to, int local) {
        int lo = from;
        int hi = to - 1;
        while (lo <= hi) {
            int mid = (lo + hi) >>> 1;
            int t = b.tickerIndex(mid);
            if (t < local) lo = mid + 1;
            else if (t > local) hi = mid - 1;
            else return mid;
        }
        return -1;
    }

    /**
     * Integer ids of {@code symbols}, assigning new ones as needed. Runs in its own short
     * transactions: an interned symbol is only a dictionary entry, visible in no panel until an
     * upsert that uses it commits.
     */
    int[] internTickers(List<String> symbols) {
        int[] out = new int[symbols.size()];
        List<String> missing = new ArrayList<>();
        for (int i = 0; i < out.length; i++) {
            Integer id = tickerIds.get(symbols.get(i));
            if (id == null) missing.add(symbols.get(i));
            else out[i] = id;
        }
        if (!missing.isEmpty()) {
            SQLException last = null;
            for (int attempt = 1; attempt <= ATTEMPTS && !missing.isEmpty(); attempt++) {
                try (Connection c = ds.getConnection()) {
                    cacheTickerIds(c, missing);
                    missing.removeIf(tickerIds::containsKey);
                    if (missing.isEmpty()) break;
                    c.setAutoCommit(false);
                    try (PreparedStatement p = c.prepareStatement("INSERT INTO ticker (symbol) VALUES (?)")) {
                        for (String s : missing) {
                            p.setString(1, s);
                            p.addBatch();
                        }
                        p.executeBatch();
                        c.commit();
                    } catch (SQLException e) {
                        c.rollback();
                        throw e;
                    } finally {
                        c.setAutoCommit(true);
                    }
                    cacheTickerIds(c, missing);
                    missing.removeIf(tickerIds::containsKey);
                } catch (SQLException e) {
                    // Another upsert interned one of these symbols at the same moment: read again.
                    if (!isUniqueViolation(e)) throw failure("intern tickers", e);
                    last = e;
                }
            }
            if (!missing.isEmpty()) throw failure("intern tickers", last);
            for (int i = 0; i < out.length; i++) out[i] = tickerIds.get(symbols.get(i));
        }
        return out;
    }

    private void cacheTickerIds(Connection c, List<String> symbols) throws SQLException {
        for (int from = 0; from < symbols.size(); from += IN_CHUNK) {
            List<String> chunk = symbols.subList(from, Math.min(symbols.size(), from + IN_CHUNK));
            String sql = "SELECT id, symbol FROM ticker WHERE symbol IN (" + placeholders(chunk.size()) + ")";
            try (PreparedStatement p = c.prepareStatement(sql)) {
                for (int i = 0; i < chunk.size(); i++) p.setString(i + 1, chunk.get(i));
                try (ResultSet rs = p.executeQuery()) {
                    while (rs.next()) tickerIds.put(rs.getString(2), rs.getInt(1));
                }
            }
        }
    }

    // ------------------------------------------------------------------ summaries

    /** Every panel, by name. */
    public List<PanelSummary> panels() {
        try (Connection c = ds.getConnection()) {
            return summaries(c, null);
        } catch (SQLException e) {
            throw failure("list panels", e);
        }
    }

    /** The panel's summary, or empty when no panel has that name. */
    public Optional<PanelSummary> panel(String name) {
        try (Connection c = ds.getConnection()) {
            List<PanelSummary> list = summaries(c, name);
            return list.isEmpty() ? Optional.empty() : Optional.of(list.get(0));
        } catch (SQLException e) {
            throw failure("read panel " + name, e);
        }
    }

    private static List<PanelSummary> summaries(Connection c, String only) throws SQLException {
        String where = only == null ? "" : " WHERE p.name = ?";
        Map<Long, Long> tickerCounts = new HashMap<>();
        try (PreparedStatement p = c.prepareStatement("SELECT p.id, COUNT(*) FROM panel p JOIN panel_ticker t ON t.panel_id = p.id"
                + where + " GROUP BY p.id")) {
            if (only != null) p.setString(1, only);
            try (ResultSet rs = p.executeQuery()) {
                while (rs.next()) tickerCounts.put(rs.getLong(1), rs.getLong(2));
            }
        }
        List<PanelSummary> out = new ArrayList<>();
        try (PreparedStatement p = c.prepareStatement("SELECT p.id, p.name, COUNT(d.obs_date), COALESCE(SUM(d.row_count), 0), "
                + "MIN(d.obs_date), MAX(d.obs_date) FROM panel p LEFT JOIN panel_date d ON d.panel_id = p.id"
                + where + " GROUP BY p.id, p.name ORDER BY p.name")) {
            if (only != null) p.setString(1, only);
            try (ResultSet rs = p.executeQuery()) {
                while (rs.next()) {
                    out.add(new PanelSummary(rs.getString(2), tickerCounts.getOrDefault(rs.getLong(1), 0L), rs.getLong(3),
                            rs.getLong(4), rs.getObject(5, LocalDate.class), rs.getObject(6, LocalDate.class)));
                }
            }
        }
        return out;
    }

    // ------------------------------------------------------------------ read

    /**
     * Streams the panel's returns to {@code sink} in date order and, within a date, ticker order.
     * Only one date's rows are held in memory at a time.
     *
     * @param tickers only these tickers (empty = all); symbols the panel lacks are skipped
     * @param from    first date, inclusive ({@code null} = open)
     * @param to      last date, inclusive ({@code null} = open)
     * @throws NotFoundException before {@code sink} is called, when the panel does not exist
     * @throws IOException       what {@code sink} throws
     */
    public void readReturns(String panel, Collection<String> tickers, LocalDate from, LocalDate to, ReturnSink sink) throws IOException {
        try (Connection c = ds.getConnection()) {
            snapshot(c);
            long panelId = requirePanel(c, panel);
            PanelTickers pt = panelTickers(c, panelId);
            List<Integer> wanted = new ArrayList<>();
            for (String s : tickers) {
                Integer id = pt.idOf.get(s);
                if (id != null) wanted.add(id);
            }
            if (!tickers.isEmpty() && wanted.isEmpty()) return;
            String sql = "SELECT obs_date, ticker_id, ret FROM panel_return WHERE panel_id = ? AND obs_date >= ? AND obs_date <= ?"
                    + (wanted.isEmpty() ? "" : " AND ticker_id IN (" + placeholders(wanted.size()) + ")") + " ORDER BY obs_date";
            List<DateCount> dates = dateCounts(c, panelId, from, to);
            DateOrder order = new DateOrder(pt, sink);
            try (PreparedStatement p = c.prepareStatement(sql)) {
                p.setFetchSize(FETCH);
                for (LocalDate[] range : chunks(dates)) {
                    int i = 1;
                    p.setLong(i++, panelId);
                    p.setObject(i++, range[0]);
                    p.setObject(i++, range[1]);
                    for (int id : wanted) p.setInt(i++, id);
                    try (ResultSet rs = p.executeQuery()) {
                        while (rs.next()) order.add(rs.getObject(1, LocalDate.class), rs.getInt(2), rs.getDouble(3));
                    }
                }
            }
            order.flush();
        } catch (SQLException e) {
            throw failure("read panel " + panel, e);
        }
    }

    /** Buffers the rows of one date, then hands them to the sink in ticker order. */
    private static final class DateOrder {
        private final PanelTickers pt;
        private final ReturnSink sink;
        private final double[] valueOfRank;
        private final int[] ranks;
        private int count;
        private LocalDate current;

        DateOrder(PanelTickers pt, ReturnSink sink) {
            this.pt = pt;
            this.sink = sink;
            this.valueOfRank = new double[pt.symbolsByRank.length];
            this.ranks = new int[pt.symbolsByRank.length];
        }

        void add(LocalDate date, int tickerId, double value) throws IOException {
            if (!date.equals(current)) {
                flush();
                current = date;
            }
            int rank = pt.rankOfId[tickerId];
            valueOfRank[rank] = value;
            ranks[count++] = rank;
        }

        void flush() throws IOException {
            Arrays.sort(ranks, 0, count);
            for (int j = 0; j < count; j++) sink.accept(current, pt.symbolsByRank[ranks[j]], valueOfRank[ranks[j]]);
            count = 0;
        }
    }

    /** One date of a panel and how many rows it holds. */
    private record DateCount(LocalDate date, int rows) {
    }

    /** The panel's dates in [from, to] (null = open) with their row counts, ascending. */
    private static List<DateCount> dateCounts(Connection c, long panelId, LocalDate from, LocalDate to) throws SQLException {
        StringBuilder sql = new StringBuilder("SELECT obs_date, row_count FROM panel_date WHERE panel_id = ?");
        if (from != null) sql.append(" AND obs_date >= ?");
        if (to != null) sql.append(" AND obs_date <= ?");
        sql.append(" ORDER BY obs_date");
        try (PreparedStatement p = c.prepareStatement(sql.toString())) {
            int i = 1;
            p.setLong(i++, panelId);
            if (from != null) p.setObject(i++, from);
            if (to != null) p.setObject(i, to);
            List<DateCount> out = new ArrayList<>();
            try (ResultSet rs = p.executeQuery()) {
                while (rs.next()) out.add(new DateCount(rs.getObject(1, LocalDate.class), rs.getInt(2)));
            }
            return out;
        }
    }

    /** Consecutive runs of dates holding at most CHUNK_ROWS rows each (a bigger single date is its own run). */
    private static List<LocalDate[]> chunks(List<DateCount> dates) {
        List<LocalDate[]> out = new ArrayList<>();
        int start = 0;
        long rows = 0;
        for (int i = 0; i < dates.size(); i++) {
            if (i > start && rows + dates.get(i).rows() > CHUNK_ROWS) {
                out.add(new LocalDate[] {dates.get(start).date(), dates.get(i - 1).date()});
                start = i;
                rows = 0;
            }
            rows += dates.get(i).rows();
        }
        if (start < dates.size()) out.add(new LocalDate[] {dates.get(start).date(), dates.get(dates.size() - 1).date()});
        return out;
    }

    /**
     * The fit window ending at {@code asOf}: the last {@code windowDays} distinct dates of the panel
     * that are {@code <= asOf} (fewer if the panel holds fewer), every ticker with at least one
     * observation on those dates (ascending), NaN where a ticker has no row on a date. Nothing dated
     * after {@code asOf} is read. A panel with no date {@code <= asOf} gives an empty (0 x 0) panel.
     *
     * @throws IllegalArgumentException when windowDays is below 1
     * @throws NotFoundException        when the panel does not exist
     */
    public ReturnPanel loadWindow(String panel, LocalDate asOf, int windowDays) {
        if (windowDays < 1) throw new IllegalArgumentException("windowDays must be at least 1, was " + windowDays);
        try (Connection c = ds.getConnection()) {
            snapshot(c);
            long panelId = requirePanel(c, panel);
            List<DateCount> dates = new ArrayList<>(Math.min(windowDays, 10_000));
            try (PreparedStatement p = c.prepareStatement("SELECT obs_date, row_count FROM panel_date WHERE panel_id = ? AND obs_date <= ? "
                    + "ORDER BY obs_date DESC FETCH FIRST ? ROWS ONLY")) {
                p.setLong(1, panelId);
                p.setObject(2, asOf);
                p.setInt(3, windowDays);
                try (ResultSet rs = p.executeQuery()) {
                    while (rs.next()) dates.add(new DateCount(rs.getObject(1, LocalDate.class), rs.getInt(2)));
                }
            }
            if (dates.isEmpty()) return new ReturnPanel(List.of(), List.of(), new double[0]);
            Collections.reverse(dates);
            return readWindow(c, panelId, dates);
        } catch (SQLException e) {
            throw failure("load window of panel " + panel, e);
        }
    }

    private static ReturnPanel readWindow(Connection c, long panelId, List<DateCount> window) throws SQLException {
        List<LocalDate> dates = new ArrayList<>(window.size());
        long expectedRows = 0;
        for (DateCount d : window) {
            dates.add(d.date());
            expectedRows += d.rows();
        }
        int cap = (int) Math.min(Integer.MAX_VALUE - 8, Math.max(16, expectedRows));
        int[] rowOf = new int[cap];
        int[] idOf = new int[cap];
        double[] valueOf = new double[cap];
        int n = 0;
        int maxId = 0;
        // One short query per date: the row is known, so no date is decoded per value, and no
        // result is large enough for H2 to spill it to disk.
        try (PreparedStatement p = c.prepareStatement("SELECT ticker_id, ret FROM panel_return WHERE panel_id = ? AND obs_date = ?")) {
            p.setFetchSize(FETCH);
            for (int t = 0; t < dates.size(); t++) {
                p.setLong(1, panelId);
                p.setObject(2, dates.get(t));
                try (ResultSet rs = p.executeQuery()) {
                    while (rs.next()) {
                        if (n == rowOf.length) {
                            int grown = rowOf.length + (rowOf.length >> 1);
                            rowOf = Arrays.copyOf(rowOf, grown);
                            idOf = Arrays.copyOf(idOf, grown);
                            valueOf = Arrays.copyOf(valueOf, grown);
                        }
                        rowOf[n] = t;
                        int id = rs.getInt(1);
                        idOf[n] = id;
                        maxId = Math.max(maxId, id);
                        valueOf[n] = rs.getDouble(2);
                        n++;
                    }
                }
            }
        }

        PanelTickers pt = panelTickers(c, panelId);
        boolean[] seen = new boolean[maxId + 1];
        for (int i = 0; i < n; i++) seen[idOf[i]] = true;
        // Columns in ticker order: walk the panel's tickers by rank and keep those seen.
        int[] colOfId = new int[maxId + 1];
        List<String> tickers = new ArrayList<>();
        for (int rank = 0; rank < pt.symbolsByRank.length; rank++) {
            int id = pt.idsByRank[rank];
            if (id <= maxId && seen[id]) {
                colOfId[id] = tickers.size();
                tickers.add(pt.symbolsByRank[rank]);
            }
        }
        int k = tickers.size();
        double[] values = new double[dates.size() * k];
        Arrays.fill(values, Double.NaN);
        for (int i = 0; i < n; i++) values[rowOf[i] * k + colOfId[idOf[i]]] = valueOf[i];
        return new ReturnPanel(dates, tickers, values);
    }

    /**
     * The last date of the panel, empty while it holds no rows.
     *
     * @throws NotFoundException when the panel does not exist
     */
    public Optional<LocalDate> lastDate(String panel) {
        try (Connection c = ds.getConnection()) {
            long panelId = requirePanel(c, panel);
            try (PreparedStatement p = c.prepareStatement("SELECT MAX(obs_date) FROM panel_date WHERE panel_id = ?")) {
                p.setLong(1, panelId);
                try (ResultSet rs = p.executeQuery()) {
                    rs.next();
                    return Optional.ofNullable(rs.getObject(1, LocalDate.class));
                }
            }
        } catch (SQLException e) {
            throw failure("read last date of panel " + panel, e);
        }
    }

    /**
     * The panel's distinct dates in [from, to], ascending; either bound may be {@code null} (open).
     * Reads only the per-date index, never the returns.
     *
     * @throws NotFoundException when the panel does not exist
     */
    public List<LocalDate> dates(String panel, LocalDate from, LocalDate to) {
        try (Connection c = ds.getConnection()) {
            List<LocalDate> out = new ArrayList<>();
            for (DateCount d : dateCounts(c, requirePanel(c, panel), from, to)) out.add(d.date());
            return out;
        } catch (SQLException e) {
            throw failure("read dates of panel " + panel, e);
        }
    }

    // ------------------------------------------------------------------ helpers

    /** The tickers of one panel: symbols in ascending order with their ids, and each id's rank. */
    private record PanelTickers(String[] symbolsByRank, int[] idsByRank, int[] rankOfId, Map<String, Integer> idOf) {
    }

    private static PanelTickers panelTickers(Connection c, long panelId) throws SQLException {
        List<String> symbols = new ArrayList<>();
        List<Integer> ids = new ArrayList<>();
        try (PreparedStatement p = c.prepareStatement("SELECT t.symbol, t.id FROM panel_ticker pt JOIN ticker t ON t.id = pt.ticker_id "
                + "WHERE pt.panel_id = ? ORDER BY t.symbol")) {
            p.setLong(1, panelId);
            try (ResultSet rs = p.executeQuery()) {
                while (rs.next()) {
                    symbols.add(rs.getString(1));
                    ids.add(rs.getInt(2));
                }
            }
        }
        // Sorted again in Java: the database's collation need not be the String order we promise.
        Integer[] order = new Integer[symbols.size()];
        for (int i = 0; i < order.length; i++) order[i] = i;
        Arrays.sort(order, (a, b) -> symbols.get(a).compareTo(symbols.get(b)));
        String[] byRank = new String[order.length];
        int[] idsByRank = new int[order.length];
        int maxId = 0;
        Map<String, Integer> idOf = new HashMap<>();
        for (int r = 0; r < order.length; r++) {
            byRank[r] = symbols.get(order[r]);
            idsByRank[r] = ids.get(order[r]);
            maxId = Math.max(maxId, idsByRank[r]);
            idOf.put(byRank[r], idsByRank[r]);
        }
        int[] rankOfId = new int[maxId + 1];
        for (int r = 0; r < order.length; r++) rankOfId[idsByRank[r]] = r;
        return new PanelTickers(byRank, idsByRank, rankOfId, idOf);
    }

    /**
     * Makes the reads on {@code c} see one consistent state across several queries (an upsert
     * committing meanwhile is not half seen). The pool resets isolation and auto-commit when the
     * connection is returned, and an uncommitted read-only transaction is rolled back.
     */
    private static void snapshot(Connection c) throws SQLException {
        c.setTransactionIsolation(Connection.TRANSACTION_REPEATABLE_READ);
        c.setAutoCommit(false);
    }

    private static long requirePanel(Connection c, String panel) throws SQLException {
        OptionalLong id = panelId(c, panel);
        if (id.isEmpty()) throw new NotFoundException("panel", panel);
        return id.getAsLong();
    }

    private static OptionalLong panelId(Connection c, String panel) throws SQLException {
        try (PreparedStatement p = c.prepareStatement("SELECT id FROM panel WHERE name = ?")) {
            p.setString(1, panel);
            try (ResultSet rs = p.executeQuery()) {
                return rs.next() ? OptionalLong.of(rs.getLong(1)) : OptionalLong.empty();
            }
        }
    }

    private static String placeholders(int n) {
        return String.join(", ", Collections.nCopies(n, "?"));
    }

    private static boolean isUniqueViolation(SQLException e) {
        for (Throwable t = e; t != null; t = t.getCause()) {
            if (t instanceof SQLException s && "23505".equals(s.getSQLState())) return true;
        }
        return false;
    }

    /** Unreachable store (connection class 08, pool timeout) is temporary (503); anything else is a store fault. */
    private static RuntimeException failure(String what, SQLException e) {
        String state = e == null ? null : e.getSQLState();
        if (e instanceof SQLTransientConnectionException || (state != null && state.startsWith("08"))) {
            return new UnavailableException("the store is not reachable (" + what + ")", e);
        }
        return new StoreException(what + " failed: " + (e == null ? "unknown" : e.getMessage()), e);
    }
}
