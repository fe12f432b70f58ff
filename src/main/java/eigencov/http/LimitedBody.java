package eigencov.http;

import java.io.FilterInputStream;
import java.io.IOException;
import java.io.InputStream;
import java.util.List;

/**
 * A request body that refuses to be read past {@code maxBytes}: the limit holds for streamed
 * (chunked) bodies too, not only for those announcing a Content-Length.
 */
final class LimitedBody extends FilterInputStream {
    private final long maxBytes;
    private long count;

    LimitedBody(InputStream in, long maxBytes) {
        super(in);
        this.maxBytes = maxBytes;
    }

    /** 413 problem for a body over {@code maxBytes}. */
    static ApiException tooLarge(long maxBytes) {
        return new ApiException(413, "body-too-large", "Request body too large",
                "the request body is larger than the limit of " + maxBytes + " bytes (EIGENCOV_MAX_BODY_BYTES); "
                        + "nothing was stored; split the upload", List.of(FieldError.field("body", "larger than " + maxBytes + " bytes")));
    }

    @Override
    public int read() throws IOException {
        int b = super.read();
        if (b >= 0) count(1);
        return b;
    }

    @Override
    public int read(byte[] buf, int off, int len) throws IOException {
        int n = super.read(buf, off, len);
        if (n > 0) count(n);
        return n;
    }

    @Override
    public long skip(long n) throws IOException {
        long s = super.skip(n);
        count(s);
        return s;
    }

    private void count(long n) {
        count += n;
        if (count > maxBytes) {
            drain();
            throw tooLarge(maxBytes);
        }
    }

    /** Most of an over-limit body read and dropped before the 413 goes out. */
    static final long DRAIN_BYTES = 8L << 20;
    /** Longest time spent dropping it (checked between reads; each read is bounded by the idle timeout). */
    static final long DRAIN_NANOS = 2_000_000_000L;

    /**
     * Reads and drops what the client is still sending, within {@link #DRAIN_BYTES} and
     * {@link #DRAIN_NANOS}. Answering 413 and closing while a client is still sending makes its
     * TCP stack reset the connection, and the client then sees a broken connection instead of the
     * problem (a test caught this about once in a dozen runs). Beyond the bounds the connection is
     * closed as before.
     */
    private void drain() {
        byte[] sink = new byte[8192];
        long left = DRAIN_BYTES;
        long deadline = System.nanoTime() + DRAIN_NANOS;
        try {
            while (left > 0 && System.nanoTime() - deadline < 0) {
                int r = in.read(sink, 0, (int) Math.min(sink.length, left));
                if (r < 0) return;
                left -= r;
            }
        } catch (IOException e) {
            // the client has gone or stalled: the 413 is still the answer
        }
    }
}
