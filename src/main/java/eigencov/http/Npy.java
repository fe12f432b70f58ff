package eigencov.http;

import java.io.IOException;
import java.io.OutputStream;
import java.nio.ByteBuffer;
import java.nio.ByteOrder;
import java.nio.DoubleBuffer;
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
    /** One shared 256 KB buffer per answer: few wake-ups of the reader (see {@link WriteBuffers}). */
    private static final int CHUNK_DOUBLES = WriteBuffers.BYTES / 8;

    private Npy() {
    }

    /** Length in bytes of the file of a {@code rows x cols} matrix. */
    static long length(int rows, int cols) {
        return header(rows, cols).length + 8L * rows * cols;
    }

    /**
     * Writes the file of a {@code rows x cols} matrix (row-major {@code values}) to {@code out},
     * through one shared 256 KB buffer: no copy of the whole matrix is made.
     */
    static void write(OutputStream out, int rows, int cols, double[] values) throws IOException {
        write(out, rows, cols, DoubleBuffer.wrap(values));
    }

    /** As {@link #write(OutputStream, int, int, double[])}, reading the values from {@code values}' position on. */
    static void write(OutputStream out, int rows, int cols, DoubleBuffer values) throws IOException {
        if ((long) rows * cols != values.remaining()) {
            throw new IllegalArgumentException("values length " + values.remaining() + " != " + rows + " x " + cols);
        }
        out.write(header(rows, cols));
        byte[] chunk = WriteBuffers.take();
        try {
            DoubleBuffer doubles = ByteBuffer.wrap(chunk).order(ByteOrder.LITTLE_ENDIAN).asDoubleBuffer();
            DoubleBuffer src = values.duplicate();
            while (src.hasRemaining()) {
                int len = Math.min(CHUNK_DOUBLES, src.remaining());
                doubles.clear();
                doubles.put(src.slice().limit(len));
                src.position(src.position() + len);
                out.write(chunk, 0, len * 8);
            }
        } finally {
            WriteBuffers.giveBack(chunk);
        }
    }

    /** Magic, version, header length and the padded header dictionary. */
    private static byte[] header(int rows, int cols) {
        String dict = "{'descr': '<f8', 'fortran_order': False, 'shape': (" + rows + ", " + cols + "), }";
        int unpadded = MAGIC.length + 2 + dict.length() + 1;
        int headerLen = dict.length() + 1 + (ALIGN - unpadded % ALIGN) % ALIGN;
        ByteBuffer buf = ByteBuffer.allocate(MAGIC.length + 2 + headerLen).order(ByteOrder.LITTLE_ENDIAN);
        buf.put(MAGIC).putShort((short) headerLen).put(dict.getBytes(StandardCharsets.US_ASCII));
        for (int i = dict.length(); i < headerLen - 1; i++) buf.put((byte) ' ');
        buf.put((byte) '\n');
        return buf.array();
    }
}
