package eigencov.service;

import java.util.Arrays;
import java.util.Collections;
import java.util.List;
import java.util.Map;

/**
 * Portfolio (or benchmark) weights in request order: ticker i holds weight i. Immutable; the
 * arrays are copied in and never handed out, so reading a 3,000-name portfolio allocates nothing
 * per name (a {@code Map<String, Double>} cost a node and a boxed double for each, and hash
 * lookups to read them back).
 */
public final class Weights {
    private final String[] tickers;
    private final double[] values;

    /**
     * @param tickers names in request order (validity is checked by {@link RiskQuery})
     * @param values  weight of each name; NaN where the request gave none (a null)
     * @param count   how many of the leading entries hold
     */
    public Weights(String[] tickers, double[] values, int count) {
        if (count < 0 || count > tickers.length || count > values.length) {
            throw new IllegalArgumentException("count " + count + " outside the " + tickers.length + " tickers / " + values.length + " values");
        }
        this.tickers = Arrays.copyOf(tickers, count);
        this.values = Arrays.copyOf(values, count);
    }

    /** Weights from a map, in its iteration order (a LinkedHashMap keeps the caller's order); a null value counts as missing. */
    public static Weights of(Map<String, Double> weights) {
        String[] t = new String[weights.size()];
        double[] v = new double[weights.size()];
        int i = 0;
        for (Map.Entry<String, Double> e : weights.entrySet()) {
            t[i] = e.getKey();
            v[i++] = e.getValue() == null ? Double.NaN : e.getValue();
        }
        return new Weights(t, v, i);
    }

    public int size() {
        return tickers.length;
    }

    public String ticker(int i) {
        return tickers[i];
    }

    public double weight(int i) {
        return values[i];
    }

    /**
     * Position of the first ticker that repeats an earlier one, or -1 when all differ. An open
     * addressing table of positions: no entry object per name, as a hash set would allocate.
     */
    public int firstRepeat() {
        int n = tickers.length;
        if (n < 2) return -1;
        int capacity = Integer.highestOneBit(2 * n - 1) << 1; // a power of two >= 2n
        int mask = capacity - 1;
        int[] slots = new int[capacity]; // position + 1, 0 = free
        for (int i = 0; i < n; i++) {
            String t = tickers[i];
            int h = t.hashCode();
            int s = (h ^ h >>> 16) & mask;
            for (int at = slots[s]; at != 0; at = slots[s]) {
                if (tickers[at - 1].equals(t)) return i;
                s = (s + 1) & mask;
            }
            slots[s] = i + 1;
        }
        return -1;
    }

    /** The tickers in request order, as an unmodifiable view. */
    public List<String> tickers() {
        return Collections.unmodifiableList(Arrays.asList(tickers));
    }
}
