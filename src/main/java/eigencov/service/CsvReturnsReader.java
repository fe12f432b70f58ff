package eigencov.service;

import java.io.IOException;
import java.io.InputStream;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

/**
 * Streams a {@code text/csv} returns body (RFC 4180: comma separated, optional double quotes with
 * {@code ""} as an escaped quote, LF or CRLF line ends, optional UTF-8 byte order mark) into a
 * {@link ReturnBatchBuilder}. The header names the columns {@code date}, {@code ticker} and
 * {@code value} in any order (case and surrounding spaces ignored); blank lines are skipped. Data
 * rows are numbered from 1 after the header. Only the current record is held in memory.
 */
final class CsvReturnsReader {
    static final List<String> COLUMNS = List.of("date", "ticker", "value");
    /** Longest field kept; anything longer is certainly invalid, so it is cut rather than buffered. */
    private static final int MAX_FIELD = 256;

    private final InputStream in;
    private final byte[] buf = new byte[64 * 1024];
    private int pos;
    private int end;
    private boolean eof;

    private final List<String> fields = new ArrayList<>(4);
    private final byte[] field = new byte[MAX_FIELD];
    private int fieldLen;
    private boolean recordMalformed;
    private String malformedWhy;
    private int malformedField;
    /** Column names in body order, from the header. */
    private final List<String> names = new ArrayList<>();

    private CsvReturnsReader(InputStream in) {
        this.in = in;
    }

    /** Reads the whole body into {@code out}. A broken header or broken quoting stops the reading. */
    static void read(InputStream body, ReturnBatchBuilder out) throws IOException {
        new CsvReturnsReader(body).run(out);
    }

    private void run(ReturnBatchBuilder out) throws IOException {
        skipBom();
        if (!readRecord()) {
            out.issue(null, "header", "the body is empty; expected the header line date,ticker,value");
            return;
        }
        int[] column = header(out); // column[i] = position of COLUMNS[i]
        if (column == null) return;
        long row = 0;
        while (readRecord()) {
            if (fields.size() == 1 && fields.get(0).isEmpty() && !recordMalformed) continue; // blank line
            row++;
            out.beginRow(row);
            if (recordMalformed) {
                out.invalidRow(columnName(malformedField), "malformed CSV: " + malformedWhy);
                out.endRow();
                if (malformedWhy.startsWith("unclosed")) return; // the rest of the body is inside the quote
                continue;
            }
            if (fields.size() > COLUMNS.size()) {
                out.invalidRow(null, "expected " + COLUMNS.size() + " fields (date,ticker,value), found " + fields.size());
                out.endRow();
                continue;
            }
            for (int i = 0; i < COLUMNS.size(); i++) {
                if (column[i] >= fields.size()) continue; // reported as missing by endRow
                String v = fields.get(column[i]).strip();
                switch (i) {
                    case 0 -> out.date(v);
                    case 1 -> out.ticker(v);
                    default -> out.valueText(v);
                }
            }
            out.endRow();
        }
    }

    private int[] header(ReturnBatchBuilder out) {
        int[] column = {-1, -1, -1};
        List<String> seen = new ArrayList<>();
        for (String f : fields) seen.add(f.strip().toLowerCase(Locale.ROOT));
        boolean ok = !recordMalformed && seen.size() == COLUMNS.size();
        for (int i = 0; ok && i < COLUMNS.size(); i++) {
            column[i] = seen.indexOf(COLUMNS.get(i));
            ok = column[i] >= 0;
        }
        names.addAll(seen);
        if (!ok) {
            out.issue(null, "header", "the first line must name the columns date,ticker,value; found '"
                    + String.join(",", fields) + "'");
            return null;
        }
        return column;
    }

    private String columnName(int index) {
        return index < names.size() ? names.get(index) : null;
    }

    private void skipBom() throws IOException {
        if (fill() && end - pos >= 3 && (buf[pos] & 0xFF) == 0xEF && (buf[pos + 1] & 0xFF) == 0xBB && (buf[pos + 2] & 0xFF) == 0xBF) {
            pos += 3;
        }
    }

    /** Ensures at least one unread byte; false at the end of the body. */
    private boolean fill() throws IOException {
        if (pos < end) return true;
        if (eof) return false;
        int n;
        do {
            n = in.read(buf, 0, buf.length);
        } while (n == 0);
        if (n < 0) {
            eof = true;
            return false;
        }
        pos = 0;
        end = n;
        return true;
    }

    /** Reads one record into {@link #fields}; false when the body has ended before it. */
    private boolean readRecord() throws IOException {
        fields.clear();
        fieldLen = 0;
        recordMalformed = false;
        if (!fill()) return false;
        boolean quoted = false;      // inside a quoted field
        boolean afterQuote = false;  // a quoted field has closed; only a separator may follow
        boolean fieldStarted = false;
        while (true) {
            if (!fill()) {
                if (quoted) malformed("unclosed quote at the end of the body");
                endField();
                return true;
            }
            byte ch = buf[pos++];
            if (quoted) {
                if (ch == '"') {
                    if (!fill() || buf[pos] != '"') {
                        quoted = false;
                        afterQuote = true;
                    } else {
                        pos++;
                        append(ch);
                    }
                } else {
                    append(ch);
                }
                continue;
            }
            if (ch == ',') {
                endField();
                afterQuote = false;
                fieldStarted = false;
            } else if (ch == '\n' || ch == '\r') {
                if (ch == '\r' && fill() && buf[pos] == '\n') pos++;
                endField();
                return true;
            } else if (ch == '"' && !fieldStarted) {
                quoted = true;
                fieldStarted = true;
            } else if (afterQuote) {
                if (ch != ' ' && ch != '\t') malformed("text after a closing quote in field " + (fields.size() + 1));
            } else {
                if (ch == '"') malformed("quote inside an unquoted field " + (fields.size() + 1));
                if (ch != ' ' && ch != '\t') fieldStarted = true;
                append(ch);
            }
        }
    }

    private void append(byte ch) {
        if (fieldLen < MAX_FIELD) field[fieldLen++] = ch;
    }

    private void endField() {
        fields.add(new String(field, 0, fieldLen, StandardCharsets.UTF_8));
        fieldLen = 0;
    }

    private void malformed(String why) {
        if (!recordMalformed) {
            recordMalformed = true;
            malformedWhy = why;
            malformedField = fields.size();
        }
    }
}
