package eigencov.store;

import java.nio.ByteBuffer;
import java.nio.ByteOrder;

/** float64 arrays as little-endian bytes for BYTEA columns (portable between H2 and PostgreSQL via setBytes). */
final class Float64Blob {
    private Float64Blob() {
    }

    static byte[] encode(double[] values) {
        ByteBuffer b = ByteBuffer.allocate(values.length * Double.BYTES).order(ByteOrder.LITTLE_ENDIAN);
        b.asDoubleBuffer().put(values);
        return b.array();
    }

    static double[] decode(byte[] bytes) {
        if (bytes.length % Double.BYTES != 0) throw new StoreException("float64 blob of " + bytes.length + " bytes is not a multiple of 8", null);
        double[] out = new double[bytes.length / Double.BYTES];
        ByteBuffer.wrap(bytes).order(ByteOrder.LITTLE_ENDIAN).asDoubleBuffer().get(out);
        return out;
    }
}
