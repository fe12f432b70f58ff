package eigencov.http;

import java.lang.invoke.MethodHandles;
import java.lang.invoke.VarHandle;
import java.nio.ByteOrder;
import java.util.Arrays;

/**
 * Remembered renderings of numbers that recur from answer to answer: a value that is a property
 * of the fit rather than of the request (each asset's beta to the first factor is the same in every
 * risk answer on that fit). Rendering a double costs about 40 ns; copying its remembered text a
 * few. Not for request-dependent values: those rarely recur outside a benchmark replaying one
 * request.
 *
 * <p>A direct-mapped table of {@link #SLOTS} immutable entries shared by all threads, keyed by the
 * exact bits: a hit gives the bytes {@link ShortestDouble#write} gives for those bits, whatever
 * fit they came from; a collision just renders again and takes the slot. Entries are published by
 * a plain array store: their fields are final, so a reader sees either null, an older entry or a
 * complete new one. At most about 2 MB.
 */
final class RecurringNumbers {
    static final int SLOTS = 1 << 15;
    private static final int SHIFT = Long.SIZE - Integer.numberOfTrailingZeros(SLOTS);
    private static final VarHandle LONG_LE = MethodHandles.byteArrayViewVarHandle(long[].class, ByteOrder.LITTLE_ENDIAN);
    private static final Entry[] TABLE = new Entry[SLOTS];

    /** A rendering: {@code text} holds {@link ShortestDouble#MAX_CHARS} bytes, the first {@code length} of them the number. */
    private record Entry(long bits, byte[] text, int length) {
    }

    private RecurringNumbers() {
    }

    /**
     * As {@link ShortestDouble#write}: writes finite {@code v} at {@code buf[pos..]}, which needs
     * {@link ShortestDouble#ROOM} bytes of room, and returns the position after it.
     */
    static int write(double v, byte[] buf, int pos) {
        long bits = Double.doubleToRawLongBits(v);
        int slot = (int) ((bits * 0x9E37_79B9_7F4A_7C15L) >>> SHIFT);
        Entry e = TABLE[slot];
        if (e != null && e.bits == bits) {
            byte[] t = e.text;
            LONG_LE.set(buf, pos, (long) LONG_LE.get(t, 0));
            LONG_LE.set(buf, pos + 8, (long) LONG_LE.get(t, 8));
            LONG_LE.set(buf, pos + 16, (long) LONG_LE.get(t, 16));
            return pos + e.length;
        }
        int end = ShortestDouble.write(v, buf, pos);
        TABLE[slot] = new Entry(bits, Arrays.copyOfRange(buf, pos, pos + ShortestDouble.MAX_CHARS), end - pos);
        return end;
    }
}
