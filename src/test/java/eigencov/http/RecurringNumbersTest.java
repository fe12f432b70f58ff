package eigencov.http;

import org.junit.jupiter.api.Test;

import java.nio.charset.StandardCharsets;
import java.util.SplittableRandom;

import static org.junit.jupiter.api.Assertions.assertEquals;

/** Remembered renderings must be byte for byte what ShortestDouble renders (itself pinned against Jackson). */
class RecurringNumbersTest {
    @Test
    void remembered_renderings_equal_fresh_ones_on_first_and_later_writes() {
        SplittableRandom rnd = new SplittableRandom(19L);
        double[] v = new double[50_000];
        for (int i = 0; i < v.length; i++) {
            v[i] = switch (i % 3) {
                case 0 -> Double.longBitsToDouble(rnd.nextLong()) % 1e300;
                case 1 -> rnd.nextGaussian() * Math.pow(10, rnd.nextInt(-12, 12));
                default -> 1 + rnd.nextGaussian() * 0.3; // betas
            };
            if (!Double.isFinite(v[i])) v[i] = i;
        }
        for (int pass = 0; pass < 3; pass++) {
            for (double x : v) assertEquals(fresh(x), remembered(x), "value " + x + ", pass " + pass);
        }
    }

    @Test
    void values_sharing_a_slot_take_it_in_turn_and_each_still_renders_right() {
        // 2^15 slots: among 100,000 values some pairs must share one; alternate between such pairs
        SplittableRandom rnd = new SplittableRandom(23L);
        double[] bySlot = new double[RecurringNumbers.SLOTS];
        int pairs = 0;
        for (int i = 0; i < 100_000 && pairs < 200; i++) {
            double x = rnd.nextGaussian();
            int slot = (int) ((Double.doubleToRawLongBits(x) * 0x9E37_79B9_7F4A_7C15L) >>> (64 - 15));
            double other = bySlot[slot];
            if (other != 0 && other != x) {
                for (int k = 0; k < 3; k++) {
                    assertEquals(fresh(x), remembered(x));
                    assertEquals(fresh(other), remembered(other));
                }
                pairs++;
            }
            bySlot[slot] = x;
        }
        assertEquals(200, pairs, "the test needs colliding values");
    }

    private static String fresh(double x) {
        byte[] b = new byte[64];
        int end = ShortestDouble.write(x, b, 5);
        return new String(b, 5, end - 5, StandardCharsets.US_ASCII);
    }

    private static String remembered(double x) {
        byte[] b = new byte[64];
        java.util.Arrays.fill(b, (byte) '#');
        int end = RecurringNumbers.write(x, b, 5);
        return new String(b, 5, end - 5, StandardCharsets.US_ASCII);
    }
}
