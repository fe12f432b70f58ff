package eigencov.store;

import org.postgresql.PGConnection;
import org.postgresql.copy.CopyIn;

import java.nio.charset.StandardCharsets;
import java.sql.Connection;
import java.sql.PreparedStatement;
import java.sql.SQLException;
import java.sql.Statement;

/**
 * The PostgreSQL fast path of an upsert: rows known to be new are streamed into
 * {@code panel_return} with {@code COPY ... FROM STDIN}; rows that exist are streamed into a
 * transaction-local staging table and updated with one {@code UPDATE ... FROM}. Runs inside the
 * caller's transaction (the panel row is locked, so no other writer adds the same keys).
 *
 * <p>Measured on the 2-core machine with 1,002,000 new rows: batched {@code INSERT}s 30,000 rows/s,
 * with {@code reWriteBatchedInserts} 70,000, {@code COPY} into a staging table then
 * {@code INSERT ... ON CONFLICT} 56,000, {@code COPY} straight into the table 133,000.
 */
final class PgBulkWriter {
    /** Bytes buffered before each hand-over to the driver. */
    private static final int CHUNK = 1 << 20;

    private PgBulkWriter() {
    }

    /**
     * Writes every row of {@code b}: {@code exists[r]} false means insert, true means update.
     *
     * @param ids            store ticker id of each batch ticker
     * @param insertedOnDate filled with the number of inserted rows per batch date
     */
    static void write(Connection c, long panelId, ReturnBatch b, int[] ids, boolean[] exists, int[] insertedOnDate) throws SQLException {
        int n = b.size();
        byte[][] dateText = new byte[b.dateCount()][];
        for (int d = 0; d < dateText.length; d++) dateText[d] = (b.date(d) + "\t").getBytes(StandardCharsets.US_ASCII);
        byte[] panelText = (panelId + "\t").getBytes(StandardCharsets.US_ASCII);
        int updates = 0;
        for (int r = 0; r < n; r++) {
            if (exists[r]) updates++;
            else insertedOnDate[b.dateIndex(r)]++;
        }
        var copy = c.unwrap(PGConnection.class).getCopyAPI();
        if (updates < n) {
            stream(copy.copyIn("COPY panel_return (panel_id, obs_date, ticker_id, ret) FROM STDIN"), b, ids, exists, false,
                    panelText, dateText);
        }
        if (updates > 0) {
            try (Statement s = c.createStatement()) {
                s.execute("CREATE TEMP TABLE eigencov_upsert (obs_date DATE NOT NULL, ticker_id INT NOT NULL, "
                        + "ret DOUBLE PRECISION NOT NULL) ON COMMIT DROP");
            }
            stream(copy.copyIn("COPY eigencov_upsert (obs_date, ticker_id, ret) FROM STDIN"), b, ids, exists, true, null, dateText);
            try (PreparedStatement p = c.prepareStatement("UPDATE panel_return t SET ret = u.ret FROM eigencov_upsert u "
                    + "WHERE t.panel_id = ? AND t.obs_date = u.obs_date AND t.ticker_id = u.ticker_id")) {
                p.setLong(1, panelId);
                int changed = p.executeUpdate();
                if (changed != updates) throw new SQLException("expected to update " + updates + " rows, updated " + changed);
            }
        }
    }

    /** COPY text format, one row per line, tab-separated; values in Java's shortest round-trip form. */
    private static void stream(CopyIn in, ReturnBatch b, int[] ids, boolean[] exists, boolean existing, byte[] panelText,
                               byte[][] dateText) throws SQLException {
        byte[] buf = new byte[CHUNK + 256];
        int len = 0;
        try {
            for (int r = 0; r < b.size(); r++) {
                if (exists[r] != existing) continue;
                if (panelText != null) len = put(buf, len, panelText);
                len = put(buf, len, dateText[b.dateIndex(r)]);
                len = putAscii(buf, len, Integer.toString(ids[b.tickerIndex(r)]));
                buf[len++] = '\t';
                len = putAscii(buf, len, Double.toString(b.value(r)));
                buf[len++] = '\n';
                if (len >= CHUNK) {
                    in.writeToCopy(buf, 0, len);
                    len = 0;
                }
            }
            if (len > 0) in.writeToCopy(buf, 0, len);
            in.endCopy();
        } finally {
            if (in.isActive()) in.cancelCopy();
        }
    }

    private static int put(byte[] buf, int at, byte[] bytes) {
        System.arraycopy(bytes, 0, buf, at, bytes.length);
        return at + bytes.length;
    }

    private static int putAscii(byte[] buf, int at, String s) {
        for (int i = 0; i < s.length(); i++) buf[at++] = (byte) s.charAt(i);
        return at;
    }
}
