package eigencov.http;

import java.nio.ByteBuffer;
import java.nio.ByteOrder;
import java.nio.charset.StandardCharsets;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * Reads a 2-d float64 {@code .npy} file following the published NumPy format description
 * (numpy.lib.format, version 1.0), checking every header rule on the way.
 */
final class NpyReader {
    private static final Pattern DICT = Pattern.compile(
            "\\{'descr': '<f8', 'fortran_order': False, 'shape': \\((\\d+), (\\d+)\\), \\} *\n");

    private NpyReader() {
    }

    static double[][] read(byte[] file) {
        assertArrayEquals(new byte[]{(byte) 0x93, 'N', 'U', 'M', 'P', 'Y'}, java.util.Arrays.copyOf(file, 6), "magic");
        assertEquals(1, file[6], "major version");
        assertEquals(0, file[7], "minor version");
        ByteBuffer buf = ByteBuffer.wrap(file).order(ByteOrder.LITTLE_ENDIAN);
        int headerLen = Short.toUnsignedInt(buf.getShort(8));
        int dataStart = 10 + headerLen;
        assertEquals(0, dataStart % 16, "data must start on a 16-byte boundary (format 1.0)");
        String dict = new String(file, 10, headerLen, StandardCharsets.US_ASCII);
        Matcher m = DICT.matcher(dict);
        assertTrue(m.matches(), "header dict: " + dict);
        int rows = Integer.parseInt(m.group(1));
        int cols = Integer.parseInt(m.group(2));
        assertEquals(dataStart + 8L * rows * cols, file.length, "file length");
        double[][] out = new double[rows][cols];
        for (int r = 0; r < rows; r++) {
            for (int c = 0; c < cols; c++) out[r][c] = buf.getDouble(dataStart + 8 * (r * cols + c));
        }
        return out;
    }
}
