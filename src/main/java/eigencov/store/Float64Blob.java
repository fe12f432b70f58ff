package eigencov.store;

import java.nio.ByteBuffer;
import java.nio.ByteOrder;

/** float64 arrays as little-endian bytes for BYTEA columns (portable between H2 and PostgreSQL via setBytes). */
final class Float64Blob {
    private Float64Blob() {
    }

    static byte[] encode(double[] values) {
        return encode(values, values.length);
    }

    /** The first {@code n} values. */
    static byte[] encode(double[] values, int n) {
        ByteBuffer b = ByteBuffer.allocate(n * Double.BYTES).order(ByteOrder.LITTLE_ENDIAN);
        b.asDoubleBuffer().put(values, 0, n);
        return b.array();
    }

    static double[] decode(byte[] bytes) {
        double[] out = new double[length(bytes)];
        decode(bytes, out);
        return out;
    }

    /** Decodes into the start of {@code out} (at least as long as the blob) and returns the count. */
    static int decode(byte[] bytes, double[] out) {
        int n = length(bytes);
        ByteBuffer.wrap(bytes).order(ByteOrder.LITTLE_ENDIAN).asDoubleBuffer().get(out, 0, n);
        return n;
    }

    static int length(byte[] bytes) {
        if (bytes.length % Double.BYTES != 0) throw new StoreException("float64 blob of " + bytes.length + " bytes is not a multiple of 8", null);
        return bytes.length / Double.BYTES;
    }
}
