package eigencov.store;

import javax.sql.DataSource;
import java.sql.Connection;
import java.sql.Date;
import java.sql.PreparedStatement;
import java.sql.ResultSet;
import java.sql.SQLException;
import java.time.LocalDate;
import java.util.HashMap;
import java.util.List;
import java.util.Map;

/**
 * Writes returns into a panel (creating panel and tickers as needed), upserting on (date, ticker),
 * all rows in one transaction. Used by the demo loader and tests until the ingest service is merged.
 */
public final class ReturnWriter {
    /** One return: simple decimal return of {@code ticker} on {@code date}. */
    public record Row(LocalDate date, String ticker, double value) {
    }

    private static final int BATCH = 5_000;

    private final DataSource ds;
    private final Database.Dialect dialect;

    public ReturnWriter(DataSource ds, Database.Dialect dialect) {
        this.ds = ds;
        this.dialect = dialect;
    }

    /** Upserts {@code rows} into {@code panel}, all or nothing. */
    public void upsert(String panel, List<Row> rows) {
        String upsert = dialect == Database.Dialect.H2
                ? "MERGE INTO panel_return (panel_id, obs_date, ticker_id, ret) KEY (panel_id, obs_date, ticker_id) VALUES (?, ?, ?, ?)"
                : "INSERT INTO panel_return (panel_id, obs_date, ticker_id, ret) VALUES (?, ?, ?, ?) "
                + "ON CONFLICT (panel_id, obs_date, ticker_id) DO UPDATE SET ret = EXCLUDED.ret";
        try (Connection c = ds.getConnection()) {
            c.setAutoCommit(false);
            try {
                long panelId = idOf(c, "panel", "name", panel);
                Map<String, Long> tickers = new HashMap<>();
                try (PreparedStatement p = c.prepareStatement(upsert)) {
                    int n = 0;
                    for (Row r : rows) {
                        Long tid = tickers.get(r.ticker());
                        if (tid == null) {
                            tid = idOf(c, "ticker", "symbol", r.ticker());
                            tickers.put(r.ticker(), tid);
                        }
                        p.setLong(1, panelId);
                        p.setDate(2, Date.valueOf(r.date()));
                        p.setLong(3, tid);
                        p.setDouble(4, r.value());
                        p.addBatch();
                        if (++n % BATCH == 0) p.executeBatch();
                    }
                    p.executeBatch();
                }
                c.commit();
            } catch (SQLException | RuntimeException e) {
                c.rollback();
                throw e;
            }
        } catch (SQLException e) {
            throw new StoreException("cannot write returns of panel " + panel + ": " + e.getMessage(), e);
        }
    }

    /** Id of the row of {@code table} whose {@code column} is {@code value}, inserting it if absent. */
    private static long idOf(Connection c, String table, String column, String value) throws SQLException {
        String select = "SELECT id FROM " + table + " WHERE " + column + " = ?";
        try (PreparedStatement p = c.prepareStatement(select)) {
            p.setString(1, value);
            try (ResultSet rs = p.executeQuery()) {
                if (rs.next()) return rs.getLong(1);
            }
        }
        try (PreparedStatement p = c.prepareStatement("INSERT INTO " + table + " (" + column + ") VALUES (?)", new String[] {"id"})) {
            p.setString(1, value);
            p.executeUpdate();
            try (ResultSet keys = p.getGeneratedKeys()) {
                keys.next();
                return keys.getLong(1);
            }
        }
    }
}
