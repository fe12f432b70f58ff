package eigencov.store;

import java.util.Arrays;

/**
 * Merges one date's new returns into that date's stored arrays (ticker ids ascending, values
 * aligned) in one pass. Reuses its buffers from date to date; not thread-safe.
 */
final class DayMerge {
    private final int[] freshIds;
    private final double[] freshValues;
    private int fresh;
    private int[] storedIds = new int[0];
    private double[] storedValues = new double[0];
    private int[] mergedIds = new int[0];
    private double[] mergedValues = new double[0];
    private int[] outIds;
    private double[] outValues;
    private int size;

    /** @param widest most rows one date of the batch holds */
    DayMerge(int widest) {
        freshIds = new int[widest];
        freshValues = new double[widest];
    }

    /**
     * Takes rows [from, to) of {@code b} (one date) as the new rows, ordered by ticker id; they are
     * also the whole result until {@link #into} merges them with a stored day.
     *
     * @param ids      ticker id of each of the batch's tickers
     * @param sortKeys scratch of at least to - from entries, or null when {@code ids} ascend (rows are then in id order already)
     */
    void fresh(ReturnBatch b, int[] ids, int from, int to, long[] sortKeys) {
        int m = to - from;
        if (sortKeys == null) {
            for (int r = from; r < to; r++) {
                freshIds[r - from] = ids[b.tickerIndex(r)];
                freshValues[r - from] = b.value(r);
            }
        } else {
            for (int r = from; r < to; r++) sortKeys[r - from] = ((long) ids[b.tickerIndex(r)] << 32) | (r - from);
            Arrays.sort(sortKeys, 0, m);
            for (int j = 0; j < m; j++) {
                freshIds[j] = (int) (sortKeys[j] >>> 32);
                freshValues[j] = b.value(from + (int) sortKeys[j]);
            }
        }
        fresh = m;
        outIds = freshIds;
        outValues = freshValues;
        size = m;
    }

    /**
     * Merges the new rows into a stored day: ids in either, each once, ascending; a new value
     * replaces the stored one for the same id.
     *
     * @return how many new rows replaced a stored value
     */
    int into(byte[] idBlob, byte[] valueBlob) {
        int n = Int32Blob.length(idBlob);
        if (Float64Blob.length(valueBlob) != n) {
            throw new StoreException("stored day holds " + n + " ticker ids but " + Float64Blob.length(valueBlob) + " returns", null);
        }
        if (storedIds.length < n) {
            storedIds = new int[n];
            storedValues = new double[n];
        }
        Int32Blob.decode(idBlob, storedIds);
        Float64Blob.decode(valueBlob, storedValues);
        if (mergedIds.length < n + fresh) {
            mergedIds = new int[n + fresh];
            mergedValues = new double[n + fresh];
        }
        int i = 0;
        int j = 0;
        int k = 0;
        int replaced = 0;
        while (i < n && j < fresh) {
            int a = storedIds[i];
            int f = freshIds[j];
            if (a < f) {
                mergedIds[k] = a;
                mergedValues[k++] = storedValues[i++];
            } else {
                if (a == f) {
                    i++;
                    replaced++;
                }
                mergedIds[k] = f;
                mergedValues[k++] = freshValues[j++];
            }
        }
        for (; i < n; i++, k++) {
            mergedIds[k] = storedIds[i];
            mergedValues[k] = storedValues[i];
        }
        for (; j < fresh; j++, k++) {
            mergedIds[k] = freshIds[j];
            mergedValues[k] = freshValues[j];
        }
        outIds = mergedIds;
        outValues = mergedValues;
        size = k;
        return replaced;
    }

    /** Rows in the result. */
    int size() {
        return size;
    }

    byte[] idBytes() {
        return Int32Blob.encode(outIds, size);
    }

    byte[] valueBytes() {
        return Float64Blob.encode(outValues, size);
    }
}
