package eigencov.store;

import eigencov.math.ReturnPanel;

import javax.sql.DataSource;
import java.sql.Connection;
import java.sql.Date;
import java.sql.PreparedStatement;
import java.sql.ResultSet;
import java.sql.SQLException;
import java.time.LocalDate;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.TreeSet;

/**
 * Reads fit windows from the return panels (tables of V1): point-in-time, so a window as of d
 * reads no row dated after d.
 */
public final class WindowReader {
    private final DataSource ds;

    public WindowReader(DataSource ds) {
        this.ds = ds;
    }

    public boolean panelExists(String panel) {
        try (Connection c = ds.getConnection()) {
            return panelId(c, panel).isPresent();
        } catch (SQLException e) {
            throw new StoreException("cannot read panel " + panel + ": " + e.getMessage(), e);
        }
    }

    /** The last date with a return in the panel, or empty (no such panel, or no rows). */
    public Optional<LocalDate> lastDate(String panel) {
        try (Connection c = ds.getConnection();
             PreparedStatement p = c.prepareStatement("SELECT MAX(r.obs_date) FROM panel_return r JOIN panel n ON n.id = r.panel_id WHERE n.name = ?")) {
            p.setString(1, panel);
            try (ResultSet rs = p.executeQuery()) {
                rs.next();
                Date d = rs.getDate(1);
                return Optional.ofNullable(d == null ? null : d.toLocalDate());
            }
        } catch (SQLException e) {
            throw new StoreException("cannot read panel " + panel + ": " + e.getMessage(), e);
        }
    }

    /** Every date of the panel with a return, ascending (empty for an unknown panel). */
    public List<LocalDate> dates(String panel) {
        try (Connection c = ds.getConnection();
             PreparedStatement p = c.prepareStatement("SELECT DISTINCT r.obs_date FROM panel_return r JOIN panel n ON n.id = r.panel_id "
                     + "WHERE n.name = ? ORDER BY r.obs_date")) {
            p.setString(1, panel);
            List<LocalDate> out = new ArrayList<>();
            try (ResultSet rs = p.executeQuery()) {
                while (rs.next()) out.add(rs.getDate(1).toLocalDate());
            }
            return out;
        } catch (SQLException e) {
            throw new StoreException("cannot read dates of panel " + panel + ": " + e.getMessage(), e);
        }
    }

    /**
     * The last {@code windowDays} distinct dates of the panel on or before {@code asOf}, with every
     * ticker that has a return among them (tickers sorted; NaN where a ticker has no return on a date).
     * An unknown panel or no dates gives an empty panel.
     */
    public ReturnPanel loadWindow(String panel, LocalDate asOf, int windowDays) {
        try (Connection c = ds.getConnection()) {
            Optional<Long> id = panelId(c, panel);
            if (id.isEmpty()) return new ReturnPanel(List.of(), List.of(), new double[0]);
            List<LocalDate> dates = new ArrayList<>();
            try (PreparedStatement p = c.prepareStatement("SELECT DISTINCT obs_date FROM panel_return WHERE panel_id = ? AND obs_date <= ? "
                    + "ORDER BY obs_date DESC FETCH FIRST ? ROWS ONLY")) {
                p.setLong(1, id.get());
                p.setDate(2, Date.valueOf(asOf));
                p.setInt(3, windowDays);
                try (ResultSet rs = p.executeQuery()) {
                    while (rs.next()) dates.add(rs.getDate(1).toLocalDate());
                }
            }
            if (dates.isEmpty()) return new ReturnPanel(List.of(), List.of(), new double[0]);
            java.util.Collections.reverse(dates);
            Map<LocalDate, Integer> row = new HashMap<>(dates.size() * 2);
            for (int t = 0; t < dates.size(); t++) row.put(dates.get(t), t);
            // Rows arrive in any order: keep (date row, ticker in order of appearance, value) in primitive
            // arrays, then lay them out with the tickers sorted.
            Map<String, Integer> seen = new HashMap<>();
            int[] rowOf = new int[1024];
            int[] seenOf = new int[1024];
            double[] valueOf = new double[1024];
            int n = 0;
            try (PreparedStatement p = c.prepareStatement("SELECT r.obs_date, t.symbol, r.ret FROM panel_return r JOIN ticker t ON t.id = r.ticker_id "
                    + "WHERE r.panel_id = ? AND r.obs_date >= ? AND r.obs_date <= ?")) {
                p.setLong(1, id.get());
                p.setDate(2, Date.valueOf(dates.get(0)));
                p.setDate(3, Date.valueOf(dates.get(dates.size() - 1)));
                p.setFetchSize(10_000);
                try (ResultSet rs = p.executeQuery()) {
                    while (rs.next()) {
                        if (n == rowOf.length) {
                            rowOf = Arrays.copyOf(rowOf, 2 * n);
                            seenOf = Arrays.copyOf(seenOf, 2 * n);
                            valueOf = Arrays.copyOf(valueOf, 2 * n);
                        }
                        rowOf[n] = row.get(rs.getDate(1).toLocalDate());
                        seenOf[n] = seen.computeIfAbsent(rs.getString(2), k -> seen.size());
                        valueOf[n] = rs.getDouble(3);
                        n++;
                    }
                }
            }
            List<String> tickers = new ArrayList<>(new TreeSet<>(seen.keySet()));
            int[] colOfSeen = new int[seen.size()];
            for (int i = 0; i < tickers.size(); i++) colOfSeen[seen.get(tickers.get(i))] = i;
            int cols = tickers.size();
            double[] v = new double[dates.size() * cols];
            Arrays.fill(v, Double.NaN);
            for (int r = 0; r < n; r++) v[rowOf[r] * cols + colOfSeen[seenOf[r]]] = valueOf[r];
            return new ReturnPanel(dates, tickers, v);
        } catch (SQLException e) {
            throw new StoreException("cannot read window of panel " + panel + ": " + e.getMessage(), e);
        }
    }

    private static Optional<Long> panelId(Connection c, String panel) throws SQLException {
        try (PreparedStatement p = c.prepareStatement("SELECT id FROM panel WHERE name = ?")) {
            p.setString(1, panel);
            try (ResultSet rs = p.executeQuery()) {
                return rs.next() ? Optional.of(rs.getLong(1)) : Optional.empty();
            }
        }
    }
}
