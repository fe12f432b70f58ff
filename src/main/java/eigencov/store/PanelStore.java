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
 * {@code panel_day(panel_id, obs_date, n, ticker_ids, returns)} holding one date's returns as two
 * aligned little-endian arrays (int32 ticker ids ascending, float64 returns), and
 * {@code panel_ticker(panel_id, ticker_id)}, kept in step by every upsert.
 *
 * <p>Methods naming a panel that does not exist throw {@link NotFoundException}, except
 * {@link #upsert}, which creates it, and {@link #panel}, which answers empty.
 */
public final class PanelStore {
    /** Dates per query and per write batch when upserting (each day row is read, merged and written back). */
    private static final int DAY_CHUNK = 64;
    /** Day rows per round trip when reading (PostgreSQL streams only with a fetch size). */
    private static final int FETCH_DAYS = 32;
    /**
     * Returns per read query, about. H2 materialises a whole result before the first row, so long
     * reads go date range by date range; ranges after the first are sized from the widest day seen.
     */
    private static final int CHUNK_VALUES = 250_000;
    private static final int FIRST_CHUNK_DAYS = 16;
    private static final int MAX_CHUNK_DAYS = 1_024;
    /** Bound parameters per IN (...) list, well below every driver's limit. */
    private static final int IN_CHUNK = 500;
    private static final int ATTEMPTS = 3;

    private final DataSource ds;
    /** Ticker ids never change once assigned and interning commits on its own, so caching them is safe. */
    private final Map<String, Integer> tickerIds = new ConcurrentHashMap<>();

    public PanelStore(Database db) {
        this.ds = db.dataSource();
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
                    UpsertCounts counts = write(c, panelId, batch, ids);
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

    /**
     * Merges the batch into the panel's day rows: reads the days the batch touches (a chunk of dates
     * per query), merges each day's ascending ticker ids with the batch's rows in one pass, and writes
     * the merged arrays back in JDBC batches. The caller holds the panel lock and owns the transaction.
     */
    private static UpsertCounts write(Connection c, long panelId, ReturnBatch b, int[] ids) throws SQLException {
        int nDates = b.dateCount();
        int n = b.size();
        int[] dateStart = new int[nDates + 1];
        for (int r = 0; r < n; r++) dateStart[b.dateIndex(r) + 1]++;
        for (int d = 0; d < nDates; d++) dateStart[d + 1] += dateStart[d];
        int widest = 0;
        for (int d = 0; d < nDates; d++) widest = Math.max(widest, dateStart[d + 1] - dateStart[d]);

        // The batch's rows ascend by symbol, day rows by id; ids follow symbol order unless a
        // symbol was interned after a later-sorting one, and only then must a date's rows be sorted.
        boolean idsAscending = true;
        for (int t = 1; t < ids.length; t++) idsAscending &= ids[t - 1] < ids[t];
        long[] sortKeys = idsAscending ? null : new long[widest];
        DayMerge merge = new DayMerge(widest);
        List<LocalDate> dates = b.dates();
        long updated = 0;
        try (PreparedStatement sel = c.prepareStatement("SELECT obs_date, n, ticker_ids, returns FROM panel_day "
                + "WHERE panel_id = ? AND obs_date IN (" + placeholders(DAY_CHUNK) + ")");
             PreparedStatement ins = c.prepareStatement(
                     "INSERT INTO panel_day (panel_id, obs_date, n, ticker_ids, returns) VALUES (?, ?, ?, ?, ?)");
             PreparedStatement upd = c.prepareStatement(
                     "UPDATE panel_day SET n = ?, ticker_ids = ?, returns = ? WHERE panel_id = ? AND obs_date = ?")) {
            Day[] stored = new Day[DAY_CHUNK];
            for (int from = 0; from < nDates; from += DAY_CHUNK) {
                int to = Math.min(nDates, from + DAY_CHUNK);
                Arrays.fill(stored, null);
                sel.setLong(1, panelId);
                // A short last chunk repeats its last date, so one statement serves every chunk.
                for (int i = 0; i < DAY_CHUNK; i++) sel.setObject(2 + i, b.date(Math.min(from + i, to - 1)));
                try (ResultSet rs = sel.executeQuery()) {
                    while (rs.next()) {
                        Day day = Day.of(rs);
                        stored[Collections.binarySearch(dates, day.date()) - from] = day;
                    }
                }
                boolean inserts = false;
                boolean updates = false;
                for (int d = from; d < to; d++) {
                    merge.fresh(b, ids, dateStart[d], dateStart[d + 1], sortKeys);
                    Day old = stored[d - from];
                    if (old == null) {
                        ins.setLong(1, panelId);
                        ins.setObject(2, b.date(d));
                        ins.setInt(3, merge.size());
                        ins.setBytes(4, merge.idBytes());
                        ins.setBytes(5, merge.valueBytes());
                        ins.addBatch();
                        inserts = true;
                    } else {
                        updated += merge.into(old.ids(), old.values());
                        upd.setInt(1, merge.size());
                        upd.setBytes(2, merge.idBytes());
                        upd.setBytes(3, merge.valueBytes());
                        upd.setLong(4, panelId);
                        upd.setObject(5, b.date(d));
                        upd.addBatch();
                        updates = true;
                    }
                }
                if (inserts) ins.executeBatch();
                if (updates) upd.executeBatch();
            }
        }
        addPanelTickers(c, panelId, ids);
        return new UpsertCounts(n - updated, updated);
    }

    /** Adds to panel_ticker those of {@code ids} the panel does not hold yet. */
    private static void addPanelTickers(Connection c, long panelId, int[] ids) throws SQLException {
        int maxId = 0;
        for (int id : ids) maxId = Math.max(maxId, id);
        boolean[] known = new boolean[maxId + 1];
        try (PreparedStatement p = c.prepareStatement("SELECT ticker_id FROM panel_ticker WHERE panel_id = ?")) {
            p.setLong(1, panelId);
            try (ResultSet rs = p.executeQuery()) {
                while (rs.next()) {
                    int id = rs.getInt(1);
                    if (id <= maxId) known[id] = true;
                }
            }
        }
        try (PreparedStatement p = c.prepareStatement("INSERT INTO panel_ticker (panel_id, ticker_id) VALUES (?, ?)")) {
            boolean any = false;
            for (int id : ids) {
                if (known[id]) continue;
                p.setLong(1, panelId);
                p.setInt(2, id);
                p.addBatch();
                any = true;
            }
            if (any) p.executeBatch();
        }
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
        try (PreparedStatement p = c.prepareStatement("SELECT p.id, p.name, COUNT(d.obs_date), COALESCE(SUM(d.n), 0), "
                + "MIN(d.obs_date), MAX(d.obs_date) FROM panel p LEFT JOIN panel_day d ON d.panel_id = p.id"
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
     * Only a bounded chunk of dates is held in memory at a time.
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
            boolean[] wanted = null;
            if (!tickers.isEmpty()) {
                wanted = new boolean[pt.rankOfId.length];
                boolean any = false;
                for (String s : tickers) {
                    Integer id = pt.idOf.get(s);
                    if (id != null) {
                        wanted[id] = true;
                        any = true;
                    }
                }
                if (!any) return;
            }
            SymbolOrder order = new SymbolOrder(pt, wanted, sink);
            readDays(c, panelId, dateList(c, panelId, from, to), order::emit);
        } catch (SQLException e) {
            throw failure("read panel " + panel, e);
        }
    }

    /** Hands one day's rows (the wanted tickers, or all) to the sink in ticker symbol order. */
    private static final class SymbolOrder {
        private final PanelTickers pt;
        private final boolean[] wanted;
        private final ReturnSink sink;
        private final double[] valueOfRank;
        private int[] ids = new int[0];
        private double[] values = new double[0];
        private int[] ranks = new int[0];

        SymbolOrder(PanelTickers pt, boolean[] wanted, ReturnSink sink) {
            this.pt = pt;
            this.wanted = wanted;
            this.sink = sink;
            this.valueOfRank = new double[pt.symbolsByRank.length];
        }

        void emit(Day day) throws IOException {
            if (ids.length < day.n()) {
                ids = new int[day.n()];
                values = new double[day.n()];
                ranks = new int[day.n()];
            }
            Int32Blob.decode(day.ids(), ids);
            Float64Blob.decode(day.values(), values);
            int count = 0;
            for (int i = 0; i < day.n(); i++) {
                if (wanted != null && !wanted[ids[i]]) continue;
                int rank = pt.rankOfId[ids[i]];
                valueOfRank[rank] = values[i];
                ranks[count++] = rank;
            }
            Arrays.sort(ranks, 0, count);
            for (int j = 0; j < count; j++) sink.accept(day.date(), pt.symbolsByRank[ranks[j]], valueOfRank[ranks[j]]);
        }
    }

    /** One stored panel day: its date and its n returns, still encoded. */
    private record Day(LocalDate date, int n, byte[] ids, byte[] values) {
        /** The current row of a result selecting obs_date, n, ticker_ids, returns (in that order). */
        static Day of(ResultSet rs) throws SQLException {
            Day d = new Day(rs.getObject(1, LocalDate.class), rs.getInt(2), rs.getBytes(3), rs.getBytes(4));
            if (Int32Blob.length(d.ids) != d.n || Float64Blob.length(d.values) != d.n) {
                throw new StoreException("panel day " + d.date + " is inconsistent: n = " + d.n + ", " + d.ids.length
                        + " id bytes, " + d.values.length + " return bytes", null);
            }
            return d;
        }
    }

    @FunctionalInterface
    private interface DayVisitor<E extends Exception> {
        void visit(Day day) throws E;
    }

    /**
     * Reads the day rows of {@code dates} (ascending, each held by the panel) in date order, one
     * date range per query. The first range is short; later ones are sized from the widest day seen
     * to about CHUNK_VALUES returns, so memory stays bounded however long the panel is.
     */
    private static <E extends Exception> void readDays(Connection c, long panelId, List<LocalDate> dates, DayVisitor<E> visitor)
            throws SQLException, E {
        try (PreparedStatement p = c.prepareStatement("SELECT obs_date, n, ticker_ids, returns FROM panel_day "
                + "WHERE panel_id = ? AND obs_date >= ? AND obs_date <= ? ORDER BY obs_date")) {
            p.setFetchSize(FETCH_DAYS);
            int chunk = FIRST_CHUNK_DAYS;
            for (int from = 0; from < dates.size(); ) {
                int to = Math.min(dates.size(), from + chunk);
                p.setLong(1, panelId);
                p.setObject(2, dates.get(from));
                p.setObject(3, dates.get(to - 1));
                int widest = 1;
                try (ResultSet rs = p.executeQuery()) {
                    while (rs.next()) {
                        Day day = Day.of(rs);
                        widest = Math.max(widest, day.n());
                        visitor.visit(day);
                    }
                }
                from = to;
                chunk = Math.max(1, Math.min(MAX_CHUNK_DAYS, CHUNK_VALUES / widest));
            }
        }
    }

    /** The panel's dates in [from, to] (null = open), ascending: read from the primary key alone. */
    private static List<LocalDate> dateList(Connection c, long panelId, LocalDate from, LocalDate to) throws SQLException {
        StringBuilder sql = new StringBuilder("SELECT obs_date FROM panel_day WHERE panel_id = ?");
        if (from != null) sql.append(" AND obs_date >= ?");
        if (to != null) sql.append(" AND obs_date <= ?");
        sql.append(" ORDER BY obs_date");
        try (PreparedStatement p = c.prepareStatement(sql.toString())) {
            int i = 1;
            p.setLong(i++, panelId);
            if (from != null) p.setObject(i++, from);
            if (to != null) p.setObject(i, to);
            List<LocalDate> out = new ArrayList<>();
            try (ResultSet rs = p.executeQuery()) {
                while (rs.next()) out.add(rs.getObject(1, LocalDate.class));
            }
            return out;
        }
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
            List<LocalDate> dates = new ArrayList<>(Math.min(windowDays, 10_000));
            try (PreparedStatement p = c.prepareStatement("SELECT obs_date FROM panel_day WHERE panel_id = ? AND obs_date <= ? "
                    + "ORDER BY obs_date DESC FETCH FIRST ? ROWS ONLY")) {
                p.setLong(1, panelId);
                p.setObject(2, asOf);
                p.setInt(3, windowDays);
                try (ResultSet rs = p.executeQuery()) {
                    while (rs.next()) dates.add(rs.getObject(1, LocalDate.class));
                }
            }
            if (dates.isEmpty()) return new ReturnPanel(List.of(), List.of(), new double[0]);
            Collections.reverse(dates);
            List<Day> days = new ArrayList<>(dates.size());
            readDays(c, panelId, dates, days::add);
            return toPanel(dates, days, panelTickers(c, panelId));
        } catch (SQLException e) {
            throw failure("load window of panel " + panel, e);
        }
    }

    /** Decodes the window's days straight into a T x K row-major panel over the tickers seen in them. */
    private static ReturnPanel toPanel(List<LocalDate> dates, List<Day> days, PanelTickers pt) {
        int widest = 0;
        for (Day d : days) widest = Math.max(widest, d.n());
        int[] ids = new int[widest];
        double[] values = new double[widest];
        boolean[] seen = new boolean[pt.rankOfId.length];
        for (Day d : days) {
            Int32Blob.decode(d.ids(), ids);
            for (int i = 0; i < d.n(); i++) seen[ids[i]] = true;
        }
        // Columns in ticker order: walk the panel's tickers by rank and keep those seen.
        int[] colOfId = new int[seen.length];
        List<String> tickers = new ArrayList<>();
        for (int rank = 0; rank < pt.symbolsByRank.length; rank++) {
            int id = pt.idsByRank[rank];
            if (seen[id]) {
                colOfId[id] = tickers.size();
                tickers.add(pt.symbolsByRank[rank]);
            }
        }
        int k = tickers.size();
        double[] panel = new double[days.size() * k];
        Arrays.fill(panel, Double.NaN);
        for (int t = 0; t < days.size(); t++) {
            Day d = days.get(t);
            Int32Blob.decode(d.ids(), ids);
            Float64Blob.decode(d.values(), values);
            int row = t * k;
            for (int i = 0; i < d.n(); i++) panel[row + colOfId[ids[i]]] = values[i];
        }
        return new ReturnPanel(dates, tickers, panel);
    }

    /**
     * The last date of the panel, empty while it holds no rows.
     *
     * @throws NotFoundException when the panel does not exist
     */
    public Optional<LocalDate> lastDate(String panel) {
        try (Connection c = ds.getConnection()) {
            long panelId = requirePanel(c, panel);
            try (PreparedStatement p = c.prepareStatement(
                    "SELECT obs_date FROM panel_day WHERE panel_id = ? ORDER BY obs_date DESC FETCH FIRST 1 ROWS ONLY")) {
                p.setLong(1, panelId);
                try (ResultSet rs = p.executeQuery()) {
                    return rs.next() ? Optional.of(rs.getObject(1, LocalDate.class)) : Optional.empty();
                }
            }
        } catch (SQLException e) {
            throw failure("read last date of panel " + panel, e);
        }
    }

    /**
     * The panel's distinct dates in [from, to], ascending; either bound may be {@code null} (open).
     * Reads only the primary key, never the returns.
     *
     * @throws NotFoundException when the panel does not exist
     */
    public List<LocalDate> dates(String panel, LocalDate from, LocalDate to) {
        try (Connection c = ds.getConnection()) {
            return dateList(c, requirePanel(c, panel), from, to);
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
