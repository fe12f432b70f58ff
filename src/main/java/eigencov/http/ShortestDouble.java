package eigencov.http;

import java.math.BigInteger;

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
     * Writes finite {@code v} into {@code buf} from {@code pos}, which must have {@link #MAX_CHARS}
     * bytes of room. Returns the position after the last byte.
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
                digits(f, buf, pos + len);
                pos += len;
                for (int i = len; i < exp; i++) buf[pos++] = '0';
                buf[pos] = '.';
                buf[pos + 1] = '0';
                return pos + 2;
            }
            digits(f, buf, pos + len + 1);
            System.arraycopy(buf, pos + 1, buf, pos, exp);
            buf[pos + exp] = '.';
            return pos + len + 1;
        }
        if (-3 < exp && exp <= 0) {
            buf[pos++] = '0';
            buf[pos++] = '.';
            for (int i = exp; i < 0; i++) buf[pos++] = '0';
            digits(f, buf, pos + len);
            return pos + len;
        }
        if (len == 1) {
            buf[pos] = (byte) ('0' + f);
            buf[pos + 1] = '.';
            buf[pos + 2] = '0';
            pos += 3;
        } else {
            digits(f, buf, pos + len + 1);
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
     * The decimal digits of f > 0, ending just before {@code end}: eight digits at a time with one
     * long division, then int arithmetic (long division by 100 per digit pair was the slowest part).
     */
    private static void digits(long f, byte[] buf, int end) {
        int i = end;
        while (f >= 100_000_000L) {
            long q = f / 100_000_000L;
            int r = (int) (f - q * 100_000_000L);
            int hi = r / 10_000;
            fourDigits(r - hi * 10_000, buf, i - 4);
            fourDigits(hi, buf, i - 8);
            i -= 8;
            f = q;
        }
        int v = (int) f;
        while (v >= 100) {
            int q = v / 100;
            int r = v - q * 100;
            buf[--i] = DIGIT_PAIRS[2 * r + 1];
            buf[--i] = DIGIT_PAIRS[2 * r];
            v = q;
        }
        if (v >= 10) {
            buf[--i] = DIGIT_PAIRS[2 * v + 1];
            buf[--i] = DIGIT_PAIRS[2 * v];
        } else {
            buf[--i] = (byte) ('0' + v);
        }
    }

    /** The four digits of 0 <= v < 10,000 (with leading zeros) at buf[at..at+3]. */
    private static void fourDigits(int v, byte[] buf, int at) {
        int hi = v / 100;
        int lo = v - hi * 100;
        buf[at] = DIGIT_PAIRS[2 * hi];
        buf[at + 1] = DIGIT_PAIRS[2 * hi + 1];
        buf[at + 2] = DIGIT_PAIRS[2 * lo];
        buf[at + 3] = DIGIT_PAIRS[2 * lo + 1];
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
