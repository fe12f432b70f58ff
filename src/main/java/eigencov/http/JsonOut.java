package eigencov.http;

import java.io.IOException;
import java.lang.invoke.MethodHandles;
import java.lang.invoke.VarHandle;
import java.nio.ByteOrder;
import java.io.OutputStream;
import java.nio.DoubleBuffer;
import java.nio.charset.StandardCharsets;
import java.util.Arrays;
import java.util.List;
import java.util.concurrent.ArrayBlockingQueue;

/**
 * A compact UTF-8 JSON writer for query answers, producing exactly the bytes Jackson's
 * {@code JsonGenerator} produces with our {@link HttpApi#objectMapper()} (no whitespace, doubles in
 * shortest form via {@link ShortestDouble}, the same string escapes); JsonOutTest pins this
 * against Jackson. It exists because query answers are mostly numbers and the benchmark measured
 * Jackson's per-number cost as most of the CPU of every large answer.
 *
 * <p>Writes into one buffer that goes to the stream when full and on {@link #flush()}; not
 * thread-safe; {@link #close()} flushes but leaves the stream open. Callers keep the structure
 * well formed (no checks beyond nesting depth).
 */
final class JsonOut implements AutoCloseable {
    static final int BUFFER_BYTES = 16 * 1024;
    /** Buffer for large answers: one of the shared {@link WriteBuffers}, given back on {@link #close()}. */
    static final int LARGE_BUFFER_BYTES = WriteBuffers.BYTES;
    private static final int MAX_DEPTH = 32;
    /** Longest string start {@link #quoted} reserves room for at once. */
    private static final int QUOTED_RUN = 256;
    private static final VarHandle LONG_LE = MethodHandles.byteArrayViewVarHandle(long[].class, ByteOrder.LITTLE_ENDIAN);
    /** Largest matrix {@link #symmetricRows} renders each mirrored pair of once. */
    static final int MAX_SYMMETRIC_REUSE = 1_000;
    /**
     * Triangle texts kept for reuse between answers, at most this many and this large (a 500-name
     * matrix needs about 3 MB, 700 names 6 MB): allocating them afresh for each answer was most of
     * the garbage of large covariance answers, as humongous objects that start G1 marking cycles.
     */
    static final int SPARE_TRIANGLES = 2;
    static final int MAX_SPARE_TRIANGLE_BYTES = 8 << 20;
    private static final ArrayBlockingQueue<TriangleText> SPARE = new ArrayBlockingQueue<>(SPARE_TRIANGLES);
    private static final byte[] HEX = "0123456789ABCDEF".getBytes(StandardCharsets.US_ASCII);
    /** Escape of each ASCII character: 0 none, 'u' as a backslash-u escape (u00XX), else the letter after the backslash. */
    private static final byte[] ESCAPES = new byte[128];

    static {
        for (int c = 0; c < 0x20; c++) ESCAPES[c] = 'u';
        ESCAPES['"'] = '"';
        ESCAPES['\\'] = '\\';
        ESCAPES['\b'] = 'b';
        ESCAPES['\t'] = 't';
        ESCAPES['\f'] = 'f';
        ESCAPES['\n'] = 'n';
        ESCAPES['\r'] = 'r';
    }

    private final OutputStream out;
    /** Null once closed. */
    private byte[] buf;
    private int pos;
    /** Per nesting level: whether the next element needs a comma before it. */
    private final boolean[] comma = new boolean[MAX_DEPTH];
    private int depth;
    /** A field name was just written: its value follows without a comma. */
    private boolean afterName;

    JsonOut(OutputStream out) {
        this(out, BUFFER_BYTES);
    }

    /** @param bufferBytes bytes gathered before each write to {@code out} (at least 1 KB) */
    JsonOut(OutputStream out, int bufferBytes) {
        if (bufferBytes < 1024) throw new IllegalArgumentException("bufferBytes must be at least 1024, was " + bufferBytes);
        this.out = out;
        this.buf = bufferBytes == LARGE_BUFFER_BYTES ? WriteBuffers.take() : new byte[bufferBytes];
    }

    JsonOut startObject() throws IOException {
        return open('{');
    }

    JsonOut startObject(String field) throws IOException {
        return name(field).open('{');
    }

    JsonOut endObject() throws IOException {
        return close('}');
    }

    JsonOut startArray() throws IOException {
        return open('[');
    }

    JsonOut startArray(String field) throws IOException {
        return name(field).open('[');
    }

    JsonOut endArray() throws IOException {
        return close(']');
    }

    JsonOut name(String field) throws IOException {
        separator();
        quoted(field);
        room(1);
        buf[pos++] = ':';
        afterName = true;
        return this;
    }

    /**
     * A field name encoded once ({@code "name":}), for names written thousands of times per answer
     * (the fields of each asset of a risk answer).
     */
    static final class Name {
        final byte[] bytes;
        /** {@link #bytes} zero-padded to a multiple of eight, for {@link #copyPadded}. */
        final byte[] padded;

        Name(String field) {
            this(encode(field));
        }

        private Name(byte[] bytes) {
            this.bytes = bytes;
            this.padded = Arrays.copyOf(bytes, (bytes.length + 7) & ~7);
        }

        /** Raw bytes: constant JSON text between values (e.g. {@code ,"weight":}). */
        static Name raw(byte[] text) {
            return new Name(text);
        }

        /** {@code "field":} as {@link JsonOut#name(String)} writes it. */
        private static byte[] encode(String field) {
            try {
                java.io.ByteArrayOutputStream b = new java.io.ByteArrayOutputStream();
                try (JsonOut g = new JsonOut(b)) {
                    g.name(field);
                }
                return b.toByteArray();
            } catch (IOException e) {
                throw new java.io.UncheckedIOException(e);
            }
        }
    }

    /**
     * Copies {@code len} bytes of {@code padded} (zero-padded to a multiple of eight) to
     * {@code dst[at..]} eight at a time, writing up to seven bytes of padding past the end (the next
     * write overwrites them), and returns the position after the copy. Constant texts are short:
     * two or three 8-byte moves beat a call to System.arraycopy or a byte loop.
     */
    private static int copyPadded(byte[] padded, int len, byte[] dst, int at) {
        for (int i = 0; i < len; i += 8) LONG_LE.set(dst, at + i, (long) LONG_LE.get(padded, i));
        return at + len;
    }

    /**
     * The layout of an object written once per row of a table: one string field, then number fields,
     * e.g. {@code {"ticker":"AAA","weight":0.25,"marginal":0.011}}. The constant text between the
     * values (braces, names, quotes and commas) is encoded once, so a row is a few block copies, its
     * label and its numbers.
     */
    static final class RowShape {
        private final String[] numberFieldNames;
        private final Name labelName;
        private final Name[] numberNames;
        /** {@code {"label":"} */
        private final Name head;
        /** {@code ","first":}, then {@code ,"next":} for each further number field. */
        private final Name[] between;
        /** Per number field: its values recur between answers ({@link RecurringNumbers}). */
        private final boolean[] recurring;
        private final int fixedBytes;

        RowShape(String labelField, String... numberFields) {
            if (numberFields.length == 0) throw new IllegalArgumentException("a row shape needs at least one number field");
            recurring = new boolean[numberFields.length];
            numberFieldNames = numberFields.clone();
            labelName = new Name(labelField);
            numberNames = new Name[numberFields.length];
            between = new Name[numberFields.length];
            int fixed = 0;
            byte[] h = concat(new byte[] {'{'}, labelName.bytes, new byte[] {'"'});
            head = Name.raw(h);
            fixed += h.length + 8;
            for (int j = 0; j < numberFields.length; j++) {
                numberNames[j] = new Name(numberFields[j]);
                byte[] b = concat(j == 0 ? new byte[] {'"', ','} : new byte[] {','}, numberNames[j].bytes);
                between[j] = Name.raw(b);
                fixed += b.length + 8 + ShortestDouble.ROOM;
            }
            fixedBytes = fixed + 2; // the comma before the row and the closing brace
        }

        /**
         * This shape with the values of {@code field} marked as recurring from answer to answer (a
         * property of the fit, not of the request): their renderings are remembered.
         */
        RowShape recurring(String field) {
            int j = Arrays.asList(numberFieldNames).indexOf(field);
            if (j < 0) throw new IllegalArgumentException("no number field " + field);
            RowShape marked = new RowShape(this);
            marked.recurring[j] = true;
            return marked;
        }

        /** A copy sharing the encoded text, with its own recurring flags. */
        private RowShape(RowShape base) {
            numberFieldNames = base.numberFieldNames;
            labelName = base.labelName;
            numberNames = base.numberNames;
            head = base.head;
            between = base.between;
            recurring = base.recurring.clone();
            fixedBytes = base.fixedBytes;
        }

        int numbers() {
            return numberNames.length;
        }

        private static byte[] concat(byte[]... parts) {
            java.io.ByteArrayOutputStream r = new java.io.ByteArrayOutputStream();
            for (byte[] part : parts) r.writeBytes(part);
            return r.toByteArray();
        }
    }

    /** Longest label {@link #shapedRows} writes without checks per byte of room. */
    private static final int FAST_LABEL_CHARS = 64;

    /**
     * {@code "field": [row 0, row 1, ...]} where row i is an object of {@code shape}: its label
     * {@code labels.get(i)} and the number {@code columns[j][i]} for each number field j. The same
     * bytes as writing each row with {@link #startObject()}, {@link #string(Name, String)} and
     * {@link #number(Name, double)}, which rows with a long label, a label needing escapes or a
     * non-finite number still use.
     */
    JsonOut shapedRows(String field, RowShape shape, List<String> labels, double[]... columns) throws IOException {
        int m = shape.numbers();
        if (columns.length != m) throw new IllegalArgumentException(columns.length + " columns for a row of " + m + " numbers");
        int n = labels.size();
        for (double[] c : columns) {
            if (c.length < n) throw new IllegalArgumentException("a column of " + c.length + " numbers for " + n + " rows");
        }
        startArray(field);
        for (int i = 0; i < n; i++) {
            String label = labels.get(i);
            if (!shapedRow(shape, label, columns, i)) {
                startObject();
                string(shape.labelName, label);
                for (int j = 0; j < m; j++) number(shape.numberNames[j], columns[j][i]);
                endObject();
            }
        }
        return endArray();
    }

    /** Row i by block copies; false (nothing written) when the row needs the general path. */
    private boolean shapedRow(RowShape shape, String label, double[][] columns, int i) throws IOException {
        int len = label.length();
        if (len > FAST_LABEL_CHARS) return false;
        for (double[] c : columns) {
            if (!Double.isFinite(c[i])) return false;
        }
        room(shape.fixedBytes + len);
        int p = pos; // pos moves only once the row is complete: returning false leaves nothing written
        if (comma[depth]) buf[p++] = ',';
        p = copyPadded(shape.head.padded, shape.head.bytes.length, buf, p);
        for (int c = 0; c < len; c++) {
            char ch = label.charAt(c);
            if (ch >= 0x80 || ESCAPES[ch] != 0) return false;
            buf[p++] = (byte) ch;
        }
        for (int j = 0; j < columns.length; j++) {
            Name b = shape.between[j];
            p = copyPadded(b.padded, b.bytes.length, buf, p);
            p = shape.recurring[j] ? RecurringNumbers.write(columns[j][i], buf, p) : ShortestDouble.write(columns[j][i], buf, p);
        }
        buf[p++] = '}';
        pos = p;
        comma[depth] = true;
        return true;
    }

    JsonOut name(Name field) throws IOException {
        separator();
        room(field.bytes.length + 8);
        pos = copyPadded(field.padded, field.bytes.length, buf, pos);
        afterName = true;
        return this;
    }

    JsonOut number(Name field, double value) throws IOException {
        return name(field).number(value);
    }

    JsonOut string(Name field, String value) throws IOException {
        return name(field).string(value);
    }

    JsonOut string(String value) throws IOException {
        separator();
        quoted(value);
        return this;
    }

    JsonOut string(String field, String value) throws IOException {
        return name(field).string(value);
    }

    JsonOut number(long value) throws IOException {
        separator();
        ascii(Long.toString(value));
        return this;
    }

    JsonOut number(String field, long value) throws IOException {
        return name(field).number(value);
    }

    /** A finite double in shortest form; NaN and infinities as the strings Jackson writes for them. */
    JsonOut number(double value) throws IOException {
        separator();
        if (!Double.isFinite(value)) {
            quoted(Double.toString(value));
            return this;
        }
        room(ShortestDouble.ROOM);
        pos = ShortestDouble.write(value, buf, pos);
        return this;
    }

    JsonOut number(String field, double value) throws IOException {
        return name(field).number(value);
    }

    JsonOut bool(String field, boolean value) throws IOException {
        name(field).separator();
        ascii(value ? "true" : "false");
        return this;
    }

    /** {@code "field": ["s0", "s1", ...]}. */
    JsonOut strings(String field, List<String> values) throws IOException {
        startArray(field);
        for (String s : values) string(s);
        return endArray();
    }

    /** {@code "field": [v0, v1, ...]}. */
    JsonOut numbers(String field, double[] values) throws IOException {
        startArray(field);
        for (double v : values) number(v);
        return endArray();
    }

    /** {@code "field": [[row 0], [row 1], ...]} of a rows x cols row-major matrix. */
    JsonOut rows(String field, double[] m, int rows, int cols) throws IOException {
        startArray(field);
        for (int r = 0; r < rows; r++) {
            startArray();
            int off = r * cols;
            for (int c = 0; c < cols; c++) number(m[off + c]);
            endArray();
        }
        return endArray();
    }

    /**
     * As {@link #rows} for an n x n matrix that is (usually) symmetric: an entry below the diagonal
     * whose mirror above it has the same bits is copied from the mirror's rendering instead of being
     * rendered again, which halves the number formatting of a covariance matrix (the benchmark's
     * largest cost). The output is that of {@link #rows} in every case. Keeps the upper triangle's
     * text, about 11 MB at {@link #MAX_SYMMETRIC_REUSE} names; larger matrices are rendered entry by entry.
     * Reads {@code m} by absolute index (its position is ignored).
     */
    JsonOut symmetricRows(String field, DoubleBuffer m, int n) throws IOException {
        if (n > MAX_SYMMETRIC_REUSE) {
            startArray(field);
            for (int r = 0; r < n; r++) {
                startArray();
                for (int c = 0; c < n; c++) number(m.get(r * n + c));
                endArray();
            }
            return endArray();
        }
        int upper = n * (n - 1) / 2;
        TriangleText tt = TriangleText.take(upper);
        try {
            symmetricRows(field, m, n, tt);
        } finally {
            tt.giveBack();
        }
        return this;
    }

    private void symmetricRows(String field, DoubleBuffer m, int n, TriangleText tt) throws IOException {
        int[] start = tt.start; // upper entry t's text is text[start[t] .. start[t + 1])
        byte[] text = tt.text;
        start[0] = 0;
        int t = 0; // upper entries are numbered in row order
        startArray(field);
        for (int r = 0; r < n; r++) {
            startArray();
            int row = r * n;
            for (int c = 0; c < n; c++) {
                double v = m.get(row + c);
                if (c < r && Double.doubleToRawLongBits(v) == Double.doubleToRawLongBits(m.get(c * n + r)) && Double.isFinite(v)) {
                    int u = c * (2 * n - c - 1) / 2 + (r - c - 1);
                    int len = start[u + 1] - start[u];
                    separator();
                    room(ShortestDouble.MAX_CHARS);
                    copyNumber(text, start[u], buf, pos);
                    pos += len;
                } else if (c > r && Double.isFinite(v)) {
                    separator();
                    room(ShortestDouble.ROOM);
                    int end = ShortestDouble.write(v, buf, pos);
                    int len = end - pos;
                    if (start[t] + ShortestDouble.MAX_CHARS > text.length) text = tt.grow(start[t] + ShortestDouble.MAX_CHARS);
                    copyNumber(buf, pos, text, start[t]);
                    start[t + 1] = start[t] + len;
                    t++;
                    pos = end;
                } else {
                    if (c > r) start[t + 1] = start[t++]; // not finite: nothing kept, its mirror renders itself
                    number(v);
                }
            }
            endArray();
        }
        endArray();
    }

    /**
     * Copies the {@link ShortestDouble#MAX_CHARS} bytes from {@code from} on: a rendered number and
     * whatever follows it, which the next write overwrites. Three 8-byte moves instead of a call to
     * System.arraycopy for every ~20-byte number (the copy stub's call was a profile's top entry).
     */
    private static void copyNumber(byte[] src, int from, byte[] dst, int to) {
        LONG_LE.set(dst, to, (long) LONG_LE.get(src, from));
        LONG_LE.set(dst, to + 8, (long) LONG_LE.get(src, from + 8));
        LONG_LE.set(dst, to + 16, (long) LONG_LE.get(src, from + 16));
    }

    /** The rendered upper triangle of a matrix being written, taken from the spares when one is free. */
    private static final class TriangleText {
        int[] start;
        byte[] text;

        /**
         * Room for {@code upper} entries: offsets, and text at the longest rendering of each (so no
         * regrowth, and {@link #copyNumber} may read and write the longest rendering from any entry).
         */
        static TriangleText take(int upper) {
            TriangleText tt = SPARE.poll();
            if (tt == null) tt = new TriangleText();
            if (tt.start == null || tt.start.length < upper + 1) tt.start = new int[upper + 1];
            long bytes = Math.max(64, (long) upper * ShortestDouble.MAX_CHARS);
            if (tt.text == null || tt.text.length < bytes) tt.text = new byte[(int) bytes];
            return tt;
        }

        byte[] grow(int atLeast) {
            text = Arrays.copyOf(text, Math.max(text.length * 3 / 2, atLeast));
            return text;
        }

        void giveBack() {
            if ((long) text.length + 4L * start.length <= MAX_SPARE_TRIANGLE_BYTES) SPARE.offer(this);
        }
    }

    /** Writes what is buffered to the stream (without flushing the stream). */
    void flush() throws IOException {
        if (pos > 0) {
            out.write(buf, 0, pos);
            pos = 0;
        }
    }

    /** Flushes (the stream stays open) and gives a shared buffer back; the writer is unusable afterwards. */
    @Override
    public void close() throws IOException {
        if (buf == null) return;
        try {
            flush();
        } finally {
            WriteBuffers.giveBack(buf);
            buf = null;
        }
    }

    private JsonOut open(char bracket) throws IOException {
        separator();
        if (depth + 1 >= MAX_DEPTH) throw new IllegalStateException("JSON nested deeper than " + MAX_DEPTH);
        room(1);
        buf[pos++] = (byte) bracket;
        comma[++depth] = false;
        return this;
    }

    private JsonOut close(char bracket) throws IOException {
        if (depth == 0) throw new IllegalStateException("nothing open to close with " + bracket);
        depth--;
        room(1);
        buf[pos++] = (byte) bracket;
        return this;
    }

    /** The comma before a value or field name, unless it is the first or follows its name. */
    private void separator() throws IOException {
        if (afterName) {
            afterName = false;
            return;
        }
        if (comma[depth]) {
            room(1);
            buf[pos++] = ',';
        }
        comma[depth] = true;
    }

    private void ascii(String s) throws IOException {
        room(s.length());
        for (int i = 0; i < s.length(); i++) buf[pos++] = (byte) s.charAt(i);
    }

    private void quoted(String s) throws IOException {
        int len = s.length();
        room(Math.min(len, QUOTED_RUN) + 2);
        buf[pos++] = '"';
        // the usual case, plain ASCII (tickers, field names, dates): no room check per character
        int i = 0;
        int run = Math.min(len, buf.length - pos - 1);
        for (; i < run; i++) {
            char c = s.charAt(i);
            if (c >= 0x80 || ESCAPES[c] != 0) break;
            buf[pos++] = (byte) c;
        }
        for (; i < len; i++) {
            char c = s.charAt(i);
            if (c < 0x80) {
                if (ESCAPES[c] == 0) {
                    room(1);
                    buf[pos++] = (byte) c;
                } else {
                    escape(c);
                }
            } else {
                nonAscii(c);
            }
        }
        room(1);
        buf[pos++] = '"';
    }

    /** UTF-8, except that Jackson writes each half of a surrogate pair as a backslash-u escape (uXXXX). */
    private void nonAscii(char c) throws IOException {
        room(6);
        if (Character.isSurrogate(c)) {
            buf[pos++] = '\\';
            buf[pos++] = 'u';
            buf[pos++] = HEX[c >> 12];
            buf[pos++] = HEX[(c >> 8) & 0xF];
            buf[pos++] = HEX[(c >> 4) & 0xF];
            buf[pos++] = HEX[c & 0xF];
        } else if (c < 0x800) {
            buf[pos++] = (byte) (0xC0 | c >> 6);
            buf[pos++] = (byte) (0x80 | c & 0x3F);
        } else {
            buf[pos++] = (byte) (0xE0 | c >> 12);
            buf[pos++] = (byte) (0x80 | (c >> 6) & 0x3F);
            buf[pos++] = (byte) (0x80 | c & 0x3F);
        }
    }

    /** An ASCII character that JSON strings must escape. */
    private void escape(char c) throws IOException {
        byte esc = ESCAPES[c];
        room(6);
        buf[pos++] = '\\';
        if (esc != 'u') {
            buf[pos++] = esc;
        } else {
            buf[pos++] = 'u';
            buf[pos++] = '0';
            buf[pos++] = '0';
            buf[pos++] = HEX[c >> 4];
            buf[pos++] = HEX[c & 0xF];
        }
    }

    private void room(int n) throws IOException {
        if (pos + n > buf.length) flush();
    }
}
