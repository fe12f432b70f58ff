package eigencov.http;

import java.nio.ByteBuffer;
import java.nio.ByteOrder;
import java.nio.charset.StandardCharsets;

/**
 * Encodes a float64 array in NumPy's {@code .npy} format, version 1.0: the magic string
 * {@code \x93NUMPY}, version bytes 1 and 0, a little-endian uint16 header length, an ASCII
 * Python-literal header {@code {'descr': '<f8', 'fortran_order': False, 'shape': (r, c), }}
 * padded with spaces and ended by a newline so that the data starts at a multiple of 64 bytes,
 * then the values row-major as little-endian IEEE 754 doubles. {@code numpy.load} reads it
 * directly.
 */
final class Npy {
    static final String MEDIA_TYPE = "application/x-npy";
    private static final byte[] MAGIC = {(byte) 0x93, 'N', 'U', 'M', 'P', 'Y', 1, 0};
    private static final int ALIGN = 64;

    private Npy() {
    }

    /** The whole file for a {@code rows x cols} matrix (row-major {@code values}), in one buffer. */
    static byte[] matrix(int rows, int cols, double[] values) {
        if ((long) rows * cols != values.length) throw new IllegalArgumentException("values length " + values.length + " != " + rows + " x " + cols);
        String dict = "{'descr': '<f8', 'fortran_order': False, 'shape': (" + rows + ", " + cols + "), }";
        int unpadded = MAGIC.length + 2 + dict.length() + 1;
        int headerLen = dict.length() + 1 + (ALIGN - unpadded % ALIGN) % ALIGN;
        ByteBuffer buf = ByteBuffer.allocate(MAGIC.length + 2 + headerLen + 8 * values.length).order(ByteOrder.LITTLE_ENDIAN);
        buf.put(MAGIC).putShort((short) headerLen).put(dict.getBytes(StandardCharsets.US_ASCII));
        for (int i = dict.length(); i < headerLen - 1; i++) buf.put((byte) ' ');
        buf.put((byte) '\n');
        buf.asDoubleBuffer().put(values);
        return buf.array();
    }
}
