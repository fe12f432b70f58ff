package eigencov.http;

import java.lang.invoke.MethodHandles;
import java.lang.invoke.VarHandle;
import java.math.BigInteger;
import java.nio.ByteOrder;

/**
 * Writes a finite double as ASCII bytes: the shortest decimal that rounds back to it (the closest
 * such decimal, ties to an even last digit), laid out as {@code Double.toString} of Java 19 and
 * later lays it out ({@code 0.001} to {@code 9999999.0} plain, otherwise {@code 1.2345E-4}). This is
 * the output of Jackson's fast double writer, byte for byte (pinned by ShortestDoubleTest against
 * Jackson on a million seeded doubles).
 *
 * <p>The digits come from the Schubfach algorithm (R. Giulietti, "The Schubfach way to render
 * doubles", 2020), which Jackson's fast writer also uses. Written here because the benchmark
 * showed Jackson spending about 150 ns per double (a helper object, a byte array and a String per
 * number, then a char copy), most of a 500 x 500 matrix answer; this writes into the caller's
 * buffer and allocates nothing.
 */
final class ShortestDouble {
    /** Longest output, e.g. {@code -2.2250738585072014E-308}. */
    static final int MAX_CHARS = 24;
    /**
     * Room {@link #write} needs from its start position: digits are stored eight at a time, so up to
     * seven bytes past the end of the output may be overwritten with scratch.
     */
    static final int ROOM = MAX_CHARS + 8;
    /** Eight bytes of a byte[] as one little-endian long (unaligned access is fine for the JIT). */
    private static final VarHandle LONG_LE = MethodHandles.byteArrayViewVarHandle(long[].class, ByteOrder.LITTLE_ENDIAN);
    private static final long EIGHT_ZEROS = 0x3030_3030_3030_3030L;

    private static final int P = 53;
    private static final int Q_MIN = -1074;
    private static final int Q_MAX = 971;
    private static final long C_MIN = 1L << (P - 1);
    private static final long T_MASK = C_MIN - 1;
    private static final int BQ_MASK = 0x7ff;
    /** Subnormal significands below this are scaled by 10 first (paper, section 9.9). */
    private static final long C_TINY = 3;
    private static final int K_MIN = flog10pow2(Q_MIN);
    private static final int K_MAX = flog10pow2(Q_MAX);
    private static final long MASK_63 = (1L << 63) - 1;
    /** g = floor(10^-k 2^-r) + 1 with 2^125 <= g < 2^126, as g1 2^63 + g0, for k = K_MIN..K_MAX (paper, section 9.8.3). */
    private static final long[] G = table();
    private static final long[] POW10 = new long[19];
    private static final byte[] DIGIT_PAIRS = new byte[200];

    static {
        POW10[0] = 1;
        for (int i = 1; i < POW10.length; i++) POW10[i] = POW10[i - 1] * 10;
        for (int i = 0; i < 100; i++) {
            DIGIT_PAIRS[2 * i] = (byte) ('0' + i / 10);
            DIGIT_PAIRS[2 * i + 1] = (byte) ('0' + i % 10);
        }
    }

    private ShortestDouble() {
    }

    /**
     * Writes finite {@code v} into {@code buf} from {@code pos}, which must have {@link #ROOM} bytes
     * of room (bytes past the returned position may be overwritten). Returns the position after the
     * last byte.
     *
     * @throws IllegalArgumentException for NaN and infinities (JSON has no such numbers)
     */
    static int write(double v, byte[] buf, int pos) {
        long bits = Double.doubleToRawLongBits(v);
        long t = bits & T_MASK;
        int bq = (int) (bits >>> (P - 1)) & BQ_MASK;
        if (bq == BQ_MASK) throw new IllegalArgumentException("not a finite number: " + v);
        if (bits < 0) buf[pos++] = '-';
        if (bq != 0) {
            int mq = -Q_MIN + 1 - bq;
            long c = C_MIN | t;
            if (0 < mq && mq < P) {
                // a whole number below 2^53 is its own shortest decimal
                long f = c >> mq;
                if (f << mq == c) return chars(f, 0, buf, pos);
            }
            return decimal(-mq, c, 0, buf, pos);
        }
        if (t != 0) return t < C_TINY ? decimal(Q_MIN, 10 * t, -1, buf, pos) : decimal(Q_MIN, t, 0, buf, pos);
        buf[pos] = '0';
        buf[pos + 1] = '.';
        buf[pos + 2] = '0';
        return pos + 3;
    }

    /** The shortest decimal in the rounding interval of c 2^q (paper, figures 7 and 9). */
    private static int decimal(int q, long c, int dk, byte[] buf, int pos) {
        int out = (int) c & 1;
        long cb = c << 2;
        long cbr = cb + 2;
        long cbl;
        int k;
        if (c != C_MIN || q == Q_MIN) {
            cbl = cb - 2;
            k = flog10pow2(q);
        } else {
            // the interval below a power of two is half as wide
            cbl = cb - 1;
            k = flog10threeQuartersPow2(q);
        }
        int h = q + flog2pow10(-k) + 2;
        int gi = 2 * (k - K_MIN);
        long g1 = G[gi];
        long g0 = G[gi + 1];
        long vb = rop(g1, g0, cb << h);
        long vbl = rop(g1, g0, cbl << h);
        long vbr = rop(g1, g0, cbr << h);
        long s = vb >> 2;
        if (s >= 100) {
            // one digit fewer: s' = floor(s / 10) by multiplication
            long sp10 = 10 * Math.multiplyHigh(s, 115_292_150_460_684_698L << 4);
            long tp10 = sp10 + 10;
            boolean upin = vbl + out <= sp10 << 2;
            boolean wpin = (tp10 << 2) + out <= vbr;
            if (upin != wpin) return chars(upin ? sp10 : tp10, k, buf, pos);
        }
        long u = s + 1;
        boolean uin = vbl + out <= s << 2;
        boolean win = (u << 2) + out <= vbr;
        if (uin != win) return chars(uin ? s : u, k + dk, buf, pos);
        long cmp = vb - (s + u << 1);
        return chars(cmp < 0 || cmp == 0 && (s & 1) == 0 ? s : u, k + dk, buf, pos);
    }

    /** Round to odd of g cp 2^-127 (paper, section 9.8.2). */
    private static long rop(long g1, long g0, long cp) {
        long x1 = Math.multiplyHigh(g0, cp);
        long y0 = g1 * cp;
        long y1 = Math.multiplyHigh(g1, cp);
        long z = (y0 >>> 1) + x1;
        long vbp = y1 + (z >>> 63);
        return vbp | (z & MASK_63) + MASK_63 >>> 63;
    }

    /** Lays out f 10^e (f > 0) as Double.toString does: plain when 10^-3 <= value < 10^7, else d.dddE[-]n. */
    private static int chars(long f, int e, byte[] buf, int pos) {
        while (f % 10 == 0) {
            f /= 10;
            e++;
        }
        int len = flog10pow2(Long.SIZE - Long.numberOfLeadingZeros(f));
        if (f >= POW10[len]) len++;
        int exp = e + len; // value = 0.d1d2... 10^exp
        if (0 < exp && exp <= 7) {
            if (len <= exp) {
                digits(f, len, buf, pos);
                pos += len;
                for (int i = len; i < exp; i++) buf[pos++] = '0';
                buf[pos] = '.';
                buf[pos + 1] = '0';
                return pos + 2;
            }
            digits(f, len, buf, pos + 1);
            for (int i = 0; i < exp; i++) buf[pos + i] = buf[pos + i + 1];
            buf[pos + exp] = '.';
            return pos + len + 1;
        }
        if (-3 < exp && exp <= 0) {
            buf[pos++] = '0';
            buf[pos++] = '.';
            for (int i = exp; i < 0; i++) buf[pos++] = '0';
            digits(f, len, buf, pos);
            return pos + len;
        }
        if (len == 1) {
            buf[pos] = (byte) ('0' + f);
            buf[pos + 1] = '.';
            buf[pos + 2] = '0';
            pos += 3;
        } else {
            digits(f, len, buf, pos + 1);
            buf[pos] = buf[pos + 1];
            buf[pos + 1] = '.';
            pos += len + 1;
        }
        buf[pos++] = 'E';
        int x = exp - 1;
        if (x < 0) {
            buf[pos++] = '-';
            x = -x;
        }
        if (x >= 100) {
            buf[pos++] = (byte) ('0' + x / 100);
            x %= 100;
            buf[pos++] = DIGIT_PAIRS[2 * x];
            buf[pos++] = DIGIT_PAIRS[2 * x + 1];
        } else if (x >= 10) {
            buf[pos++] = DIGIT_PAIRS[2 * x];
            buf[pos++] = DIGIT_PAIRS[2 * x + 1];
        } else {
            buf[pos++] = (byte) ('0' + x);
        }
        return pos;
    }

    /**
     * The {@code len} decimal digits of f (10^(len-1) <= f < 10^len, len <= 17) at
     * buf[start .. start + len), written eight at a time: the leading 1 to 8 digits first (their
     * store runs on into the next digits, or up to 7 bytes past the end when len <= 8), then each
     * following block of eight exactly. Per-pair table lookups with a division each were the
     * slowest part of writing a number.
     */
    private static void digits(long f, int len, byte[] buf, int start) {
        int blocks = (len - 1) >> 3;
        int lead = len - 8 * blocks;
        int shift = 8 * (8 - lead);
        if (blocks == 0) {
            LONG_LE.set(buf, start, eightDigits((int) f) >>> shift);
            return;
        }
        long q = f / 100_000_000L;
        int low = (int) (f - q * 100_000_000L);
        if (blocks == 1) {
            LONG_LE.set(buf, start, eightDigits((int) q) >>> shift);
        } else {
            long qq = q / 100_000_000L;
            LONG_LE.set(buf, start, eightDigits((int) qq) >>> shift);
            LONG_LE.set(buf, start + lead, eightDigits((int) (q - qq * 100_000_000L)));
            lead += 8;
        }
        LONG_LE.set(buf, start + lead, eightDigits(low));
    }

    /**
     * The eight ASCII digits of 0 <= v < 10^8, leading zeros included, as a little-endian long (the
     * first digit in the lowest byte). SIMD within a register: split into two 4-digit halves in
     * 32-bit lanes, each into 2-digit quarters in 16-bit lanes, each into digits in bytes, dividing
     * every lane at once by a multiply and shift (x / 100 = x 10486 >> 20 for x < 10^4, x / 10 =
     * x 103 >> 10 for x < 100; exact in these ranges).
     */
    static long eightDigits(int v) {
        long x = (v / 10_000) | ((long) (v % 10_000) << 32);
        long hundreds = ((x * 10_486) >>> 20) & 0x0000_007F_0000_007FL;
        long pairs = hundreds | ((x - 100 * hundreds) << 16);
        long tens = ((pairs * 103) >>> 10) & 0x000F_000F_000F_000FL;
        return (tens | ((pairs - 10 * tens) << 8)) + EIGHT_ZEROS;
    }

    /** floor(e log10(2)) for |e| <= 5,456,721. */
    static int flog10pow2(int e) {
        return (int) (e * 661_971_961_083L >> 41);
    }

    /** floor(log10(3/4 2^e)) for |e| <= 5,456,721. */
    static int flog10threeQuartersPow2(int e) {
        return (int) (e * 661_971_961_083L - 274_743_187_321L >> 41);
    }

    /** floor(e log2(10)) for |e| <= 1,838,394. */
    static int flog2pow10(int e) {
        return (int) (e * 913_124_641_741L >> 38);
    }

    private static long[] table() {
        long[] g = new long[2 * (K_MAX - K_MIN + 1)];
        BigInteger mask63 = BigInteger.ONE.shiftLeft(63).subtract(BigInteger.ONE);
        for (int k = K_MIN; k <= K_MAX; k++) {
            int r = flog2pow10(-k) - 125; // 10^-k = beta 2^r with 2^125 <= beta < 2^126
            BigInteger num = k <= 0 ? BigInteger.TEN.pow(-k) : BigInteger.ONE;
            BigInteger den = k <= 0 ? BigInteger.ONE : BigInteger.TEN.pow(k);
            if (r < 0) num = num.shiftLeft(-r);
            else den = den.shiftLeft(r);
            BigInteger gk = num.divide(den).add(BigInteger.ONE);
            if (gk.bitLength() != 126) throw new IllegalStateException("g of k = " + k + " has " + gk.bitLength() + " bits");
            g[2 * (k - K_MIN)] = gk.shiftRight(63).longValueExact();
            g[2 * (k - K_MIN) + 1] = gk.and(mask63).longValueExact();
        }
        return g;
    }
}
