package eigencov.store;

import java.nio.ByteBuffer;
import java.nio.ByteOrder;

/** int32 arrays as little-endian bytes for BYTEA columns (the ticker ids of a panel day). */
final class Int32Blob {
    private Int32Blob() {
    }

    /** The first {@code n} values. */
    static byte[] encode(int[] values, int n) {
        ByteBuffer b = ByteBuffer.allocate(n * Integer.BYTES).order(ByteOrder.LITTLE_ENDIAN);
        b.asIntBuffer().put(values, 0, n);
        return b.array();
    }

    /** Decodes into the start of {@code out} (at least as long as the blob) and returns the count. */
    static int decode(byte[] bytes, int[] out) {
        int n = length(bytes);
        ByteBuffer.wrap(bytes).order(ByteOrder.LITTLE_ENDIAN).asIntBuffer().get(out, 0, n);
        return n;
    }

    static int length(byte[] bytes) {
        if (bytes.length % Integer.BYTES != 0) throw new StoreException("int32 blob of " + bytes.length + " bytes is not a multiple of 4", null);
        return bytes.length / Integer.BYTES;
    }
}
