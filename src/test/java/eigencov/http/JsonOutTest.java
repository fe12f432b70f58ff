package eigencov.http;

import com.fasterxml.jackson.core.JsonEncoding;
import com.fasterxml.jackson.core.JsonGenerator;
import org.junit.jupiter.api.Test;

import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.nio.DoubleBuffer;
import java.util.List;
import java.util.SplittableRandom;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;

/**
 * JsonOut against an outside reference: Jackson's generator from the service's own ObjectMapper,
 * driven through the same calls, must give the same bytes.
 */
class JsonOutTest {
    private static final String ASCII;

    static {
        StringBuilder sb = new StringBuilder();
        for (char c = 0; c < 128; c++) sb.append(c);
        ASCII = sb.toString();
    }

    @Test
    void writes_the_same_bytes_as_jackson_for_nested_objects_strings_and_numbers() throws IOException {
        // long strings too: beyond the run quoted() reserves room for, and beyond the whole buffer
        List<String> strings = List.of("", "S0001", "A.b_c:d/e-f", ASCII, "caf\u00e9 \"q\" \\ \n", "\u4e2d\u6587\u0001x",
                "\ud83d\ude00 end\t", "x".repeat(300) + "\u00e9", "y".repeat(20_000) + "\n" + "z".repeat(300));
        double[] doubles = {0.0, -0.0, 1e-4, -2.5e-7, 123456.789, 1e7, Double.NaN, Double.POSITIVE_INFINITY,
                Double.NEGATIVE_INFINITY, Double.MIN_VALUE};
        assertSameBytes(g -> {
            g.startObject();
            g.number("id", 42L).string("model", "bench").bool("flag", true).bool("other", false);
            g.startObject("nested").startArray("empty").endArray().startObject("inner").endObject().endObject();
            g.strings("strings", strings);
            g.numbers("doubles", doubles);
            g.startArray("objects");
            JsonOut.Name ticker = new JsonOut.Name("ticker");
            JsonOut.Name w = new JsonOut.Name("w\u00e9\"");
            for (int i = 0; i < 3; i++) g.startObject().string(ticker, "T" + i).number(w, i / 7.0).endObject();
            g.endArray();
            g.rows("matrix", new double[] {1, 2, 3, 4, 5, 6}, 2, 3);
            g.endObject();
        }, j -> {
            j.writeStartObject();
            j.writeNumberField("id", 42L);
            j.writeStringField("model", "bench");
            j.writeBooleanField("flag", true);
            j.writeBooleanField("other", false);
            j.writeObjectFieldStart("nested");
            j.writeArrayFieldStart("empty");
            j.writeEndArray();
            j.writeObjectFieldStart("inner");
            j.writeEndObject();
            j.writeEndObject();
            j.writeArrayFieldStart("strings");
            for (String s : strings) j.writeString(s);
            j.writeEndArray();
            j.writeArrayFieldStart("doubles");
            for (double d : doubles) j.writeNumber(d);
            j.writeEndArray();
            j.writeArrayFieldStart("objects");
            for (int i = 0; i < 3; i++) {
                j.writeStartObject();
                j.writeStringField("ticker", "T" + i);
                j.writeNumberField("w\u00e9\"", i / 7.0);
                j.writeEndObject();
            }
            j.writeEndArray();
            jacksonRows(j, new double[] {1, 2, 3, 4, 5, 6}, 2, 3);
            j.writeEndObject();
        });
    }

    @Test
    void writes_the_same_bytes_as_jackson_for_a_matrix_larger_than_its_buffer() throws IOException {
        SplittableRandom rnd = new SplittableRandom(7L);
        int n = 120;
        double[] m = new double[n * n];
        for (int i = 0; i < m.length; i++) m[i] = rnd.nextGaussian() * 1e-4;
        assertSameBytes(g -> g.startObject().rows("matrix", m, n, n).endObject(), j -> {
            j.writeStartObject();
            jacksonRows(j, m, n, n);
            j.writeEndObject();
        });
    }

    @Test
    void writes_a_symmetric_matrix_as_jackson_does_even_where_mirrors_differ() throws IOException {
        SplittableRandom rnd = new SplittableRandom(11L);
        // sizes up and down: the triangle text is reused between calls, stale contents must not show
        for (int n : new int[] {0, 1, 2, 37, 5, 60, 3}) {
            double[] m = new double[n * n];
            for (int r = 0; r < n; r++) {
                for (int c = 0; c <= r; c++) {
                    double v = rnd.nextGaussian() * 1e-4;
                    m[r * n + c] = v;
                    // most mirrors equal; some differ in the last bit (as a correlation matrix's may), some are not finite
                    int kind = rnd.nextInt(10);
                    m[c * n + r] = kind == 0 ? Math.nextUp(v) : kind == 1 ? Double.NaN : v;
                }
            }
            assertSameBytes(g -> g.startObject().symmetricRows("matrix", DoubleBuffer.wrap(m), n).endObject(), j -> {
                j.writeStartObject();
                jacksonRows(j, m, n, n);
                j.writeEndObject();
            });
        }
    }

    @Test
    void writes_shaped_rows_as_jackson_writes_each_object_including_the_rows_that_take_the_general_path() throws IOException {
        SplittableRandom rnd = new SplittableRandom(13L);
        int n = 2_000; // about 200 KB: the 16 KB buffer fills at every offset within a row
        List<String> labels = new java.util.ArrayList<>();
        double[][] cols = new double[3][n];
        for (int i = 0; i < n; i++) {
            int kind = rnd.nextInt(40);
            labels.add(switch (kind) {
                case 0 -> "";
                case 1 -> "q\"uote\\" + i;
                case 2 -> "caf\u00e9" + i;
                case 3 -> "L".repeat(64);
                case 4 -> "L".repeat(65) + i;
                case 5 -> "tab\t" + i;
                default -> "S" + i;
            });
            for (int j = 0; j < 3; j++) {
                int v = rnd.nextInt(60);
                cols[j][i] = v == 0 ? Double.NaN : v == 1 ? Double.NEGATIVE_INFINITY : v == 2 ? -0.0 : v == 3 ? Double.MIN_VALUE
                        : v == 4 ? 1e300 : rnd.nextGaussian() * Math.pow(10, rnd.nextInt(-9, 9));
            }
        }
        String[] names = {"weight", "m\u00e9\"x", "c"};
        // the last column's renderings are remembered: written twice, the second time from memory
        JsonOut.RowShape three = new JsonOut.RowShape("ticker", names).recurring("c");
        JsonOut.RowShape one = new JsonOut.RowShape("label", "only");
        assertSameBytes(g -> {
            g.startObject().number("before", 1.5);
            g.shapedRows("rows", three, labels, cols[0], cols[1], cols[2]);
            g.shapedRows("again", three, labels, cols[0], cols[1], cols[2]);
            g.shapedRows("none", one, List.of(), cols[0]);
            g.shapedRows("single", one, labels.subList(0, 7), cols[2]);
            g.number("after", 2.5).endObject();
        }, j -> {
            j.writeStartObject();
            j.writeNumberField("before", 1.5);
            jacksonShaped(j, "rows", "ticker", names, labels, cols);
            jacksonShaped(j, "again", "ticker", names, labels, cols);
            jacksonShaped(j, "none", "label", new String[] {"only"}, List.of(), new double[][] {cols[0]});
            jacksonShaped(j, "single", "label", new String[] {"only"}, labels.subList(0, 7), new double[][] {cols[2]});
            j.writeNumberField("after", 2.5);
            j.writeEndObject();
        });
    }

    private static void jacksonShaped(JsonGenerator j, String field, String label, String[] names, List<String> labels,
                                      double[][] cols) throws IOException {
        j.writeArrayFieldStart(field);
        for (int i = 0; i < labels.size(); i++) {
            j.writeStartObject();
            j.writeStringField(label, labels.get(i));
            for (int c = 0; c < names.length; c++) j.writeNumberField(names[c], cols[c][i]);
            j.writeEndObject();
        }
        j.writeEndArray();
    }

    @Test
    void large_buffers_are_shared_between_answers_without_stale_bytes() throws IOException {
        SplittableRandom rnd = new SplittableRandom(17L);
        // a long answer, then shorter ones into the buffer it gave back; closing twice is harmless
        for (int n : new int[] {200, 3, 90, 1}) {
            double[] m = new double[n * n];
            for (int i = 0; i < m.length; i++) m[i] = rnd.nextGaussian();
            ByteArrayOutputStream ours = new ByteArrayOutputStream();
            JsonOut g = new JsonOut(ours, JsonOut.LARGE_BUFFER_BYTES);
            g.startObject().rows("matrix", m, n, n).endObject();
            g.close();
            g.close();
            ByteArrayOutputStream theirs = new ByteArrayOutputStream();
            try (JsonGenerator j = HttpApi.objectMapper().createGenerator(theirs, JsonEncoding.UTF8)) {
                j.writeStartObject();
                jacksonRows(j, m, n, n);
                j.writeEndObject();
            }
            assertArrayEquals(theirs.toByteArray(), ours.toByteArray(), "answer of " + n + " x " + n);
        }
    }

    /** "matrix": rows x cols as arrays of rows, through Jackson. */
    private static void jacksonRows(JsonGenerator j, double[] m, int rows, int cols) throws IOException {
        j.writeArrayFieldStart("matrix");
        for (int r = 0; r < rows; r++) {
            j.writeStartArray();
            for (int c = 0; c < cols; c++) j.writeNumber(m[r * cols + c]);
            j.writeEndArray();
        }
        j.writeEndArray();
    }

    private interface Ours {
        void write(JsonOut g) throws IOException;
    }

    private interface Theirs {
        void write(JsonGenerator g) throws IOException;
    }

    private static void assertSameBytes(Ours ours, Theirs theirs) throws IOException {
        ByteArrayOutputStream a = new ByteArrayOutputStream();
        try (JsonOut g = new JsonOut(a)) {
            ours.write(g);
        }
        ByteArrayOutputStream b = new ByteArrayOutputStream();
        try (JsonGenerator j = HttpApi.objectMapper().createGenerator(b, JsonEncoding.UTF8)) {
            theirs.write(j);
        }
        assertArrayEquals(b.toByteArray(), a.toByteArray(), () -> "ours:   " + a + "\njackson: " + b);
    }
}
