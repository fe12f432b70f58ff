package eigencov.service;

import org.junit.jupiter.api.Test;

import java.util.HashSet;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.SplittableRandom;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

class WeightsTest {
    @Test
    void first_repeat_agrees_with_a_hash_set_on_random_ticker_lists() {
        SplittableRandom rnd = new SplittableRandom(3L);
        for (int trial = 0; trial < 300; trial++) {
            int n = 1 + rnd.nextInt(trial < 250 ? 40 : 5_000);
            String[] t = new String[n];
            // a small alphabet makes repeats common in short lists and rare in long ones
            for (int i = 0; i < n; i++) t[i] = "T" + rnd.nextInt(Math.max(2, n * (1 + rnd.nextInt(4))));
            Weights w = new Weights(t, new double[n], n);
            Set<String> seen = new HashSet<>();
            int expected = -1;
            for (int i = 0; i < n && expected < 0; i++) if (!seen.add(t[i])) expected = i;
            assertEquals(expected, w.firstRepeat(), () -> List.of(t).toString());
        }
    }

    @Test
    void names_with_equal_hash_codes_are_not_taken_for_repeats() {
        // "Aa" and "BB" share String.hashCode (2112), as do their concatenations
        Weights w = new Weights(new String[] {"Aa", "BB", "AaAa", "BBBB", "AaBB", "BBAa"}, new double[6], 6);
        assertEquals(-1, w.firstRepeat());
        Weights again = new Weights(new String[] {"Aa", "BB", "AaBB", "BB"}, new double[4], 4);
        assertEquals(3, again.firstRepeat());
    }

    @Test
    void keeps_request_order_and_copies_its_input() {
        String[] t = {"B", "A", "C"};
        double[] v = {0.5, 0.25, 0.25};
        Weights w = new Weights(t, v, 2);
        t[0] = "X";
        v[0] = 9;
        assertEquals(List.of("B", "A"), w.tickers());
        assertEquals(0.5, w.weight(0));
        assertThrows(UnsupportedOperationException.class, () -> w.tickers().set(0, "Y"));
        Map<String, Double> m = new LinkedHashMap<>();
        m.put("Z", 1.0);
        m.put("Y", null);
        Weights fromMap = Weights.of(m);
        assertEquals(List.of("Z", "Y"), fromMap.tickers());
        assertTrue(Double.isNaN(fromMap.weight(1)));
    }
}
