package eigencov.http;

import com.fasterxml.jackson.core.io.NumberOutput;
import org.junit.jupiter.api.Test;

import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.List;
import java.util.SplittableRandom;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

/**
 * ShortestDouble against an outside reference: Jackson's fast double writer (the writer our JSON
 * used before, {@code NumberOutput.toString(v, true)}), which must be matched byte for byte.
 */
class ShortestDoubleTest {

    @Test
    void matches_jacksons_fast_writer_on_edge_cases() {
        List<Double> cases = new ArrayList<>(List.of(0.0, -0.0, Double.MIN_VALUE, -Double.MIN_VALUE, 2 * Double.MIN_VALUE,
                3 * Double.MIN_VALUE, Double.MIN_NORMAL, Math.nextDown(Double.MIN_NORMAL), Double.MAX_VALUE, -Double.MAX_VALUE,
                1e-3, Math.nextDown(1e-3), 1e7, Math.nextDown(1e7), 9999999.0, 0.1, 0.2, 0.3, 1.0 / 3, 2.0 / 3, 1e23, 5e-324,
                2e23, 8.41e21, 9007199254740991.0, 9007199254740992.0, 4.9e-324, 1.7976931348623157e308, 123456.789, 100.0));
        for (int e = -325; e <= 308; e++) {
            double p = Double.parseDouble("1e" + e);
            cases.add(p);
            cases.add(Math.nextUp(p));
            cases.add(Math.nextDown(p));
        }
        for (int e = -1074; e <= 1023; e++) cases.add(Math.scalb(1.0, e));
        for (long t = 1; t <= 2000; t++) cases.add(Double.longBitsToDouble(t));
        for (double v : cases) {
            assertSame(v);
            assertSame(-v);
        }
    }

    @Test
    void matches_jacksons_fast_writer_on_a_million_seeded_doubles() {
        SplittableRandom rnd = new SplittableRandom(20250630L);
        for (int i = 0; i < 400_000; i++) {
            double v = Double.longBitsToDouble(rnd.nextLong());
            if (Double.isFinite(v)) assertSame(v);
        }
        // the values answers are made of: variances and covariances around 1e-4, exposures, weights
        for (int i = 0; i < 600_000; i++) assertSame(rnd.nextGaussian() * Math.pow(10, rnd.nextInt(-9, 9)));
    }

    @Test
    void matches_jacksons_fast_writer_for_every_digit_count_in_every_layout() {
        // 1 to 17 significant digits, whole and fractional, plain and exponent layouts: the digits
        // are written eight at a time, so each count exercises a different split of the blocks
        String digits = "12345678901234567";
        for (int len = 1; len <= 17; len++) {
            for (int exp = -12; exp <= 25; exp++) {
                double v = Double.parseDouble(digits.substring(0, len) + "e" + (exp - len));
                assertSame(v);
                assertSame(Math.nextUp(v));
                assertSame(Math.nextDown(v));
            }
            long whole = Long.parseLong("98765432109876543".substring(0, Math.min(len, 16)));
            assertSame((double) whole);
            assertSame((double) (whole * 10));
        }
        for (int v : new int[] {0, 1, 9, 10, 99, 100, 1234, 9999, 10_000, 12_345_678, 99_999_999, 10_000_001}) {
            String expected = String.format("%08d", v);
            assertEquals(expected, new String(java.nio.ByteBuffer.allocate(8).order(java.nio.ByteOrder.LITTLE_ENDIAN)
                    .putLong(ShortestDouble.eightDigits(v)).array(), StandardCharsets.US_ASCII));
        }
    }

    @Test
    void rejects_non_finite_values() {
        byte[] buf = new byte[ShortestDouble.ROOM];
        assertThrows(IllegalArgumentException.class, () -> ShortestDouble.write(Double.NaN, buf, 0));
        assertThrows(IllegalArgumentException.class, () -> ShortestDouble.write(Double.NEGATIVE_INFINITY, buf, 0));
    }

    private static void assertSame(double v) {
        byte[] buf = new byte[ShortestDouble.ROOM + 3];
        int end = ShortestDouble.write(v, buf, 3);
        String expected = NumberOutput.toString(v, true);
        String got = new String(buf, 3, end - 3, StandardCharsets.US_ASCII);
        if (!expected.equals(got)) assertEquals(expected, got, "bits " + Long.toHexString(Double.doubleToRawLongBits(v)));
    }
}
