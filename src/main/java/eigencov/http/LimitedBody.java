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
        if (count > maxBytes) throw tooLarge(maxBytes);
    }
}
