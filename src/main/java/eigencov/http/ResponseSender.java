package eigencov.http;

import eigencov.service.FitRef;
import io.javalin.http.Context;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

import java.io.IOException;
import java.io.OutputStream;
import java.nio.charset.StandardCharsets;
import java.security.MessageDigest;
import java.security.NoSuchAlgorithmException;
import java.util.Base64;
import java.util.List;
import java.util.zip.Deflater;
import java.util.zip.GZIPOutputStream;

/**
 * Sends a query answer: names the fit and the caution in headers, sets a strong ETag per (fit,
 * request, representation, encoding) and answers a matching {@code If-None-Match} with 304, and
 * streams the body straight to the servlet output stream, gzip-compressed (fastest level) when
 * the client accepts gzip and the body is large.
 *
 * <p>Every successful query response carries these headers, whatever its format:
 * {@code X-Fit-Id}, {@code X-Fit-Model}, {@code X-Fit-As-Of}, {@code X-Fit-Created-At} and
 * {@code X-Caution}; JSON bodies repeat them as {@code "fit"} and {@code "caution"}.
 */
final class ResponseSender {
    private static final Logger LOG = LoggerFactory.getLogger(ResponseSender.class);
    static final String CAUTION = "Estimates from historical returns under a statistical factor model; not investment advice.";
    /** Smaller bodies go uncompressed: below about one network buffer gzip saves little and costs a deflater. */
    static final long GZIP_MIN_BYTES = 16 * 1024;
    /** Longest ticker or date list sent in a header (Jetty's response header buffer is raised to hold it, see HttpApi). */
    static final int MAX_LIST_HEADER_CHARS = 100_000;

    /** Writes a body to the (possibly compressing) response stream. */
    interface Body {
        void writeTo(OutputStream out) throws IOException;
    }

    private ResponseSender() {
    }

    /**
     * @param requestKey  the normalised request (everything that shapes the answer except the fit), as bytes
     * @param approxBytes rough body size, used only to decide on compression
     * @param compressible false for binary formats that do not compress (float64 mantissas)
     */
    static void send(Context ctx, FitRef fit, Representation rep, byte[] requestKey, long approxBytes,
                     boolean compressible, Body body) {
        send(ctx, fit, rep, requestKey, approxBytes, compressible, -1, body);
    }

    private static void send(Context ctx, FitRef fit, Representation rep, byte[] requestKey, long approxBytes,
                             boolean compressible, long exactLength, Body body) {
        boolean gzip = compressible && approxBytes >= GZIP_MIN_BYTES && acceptsGzip(ctx.header("Accept-Encoding"));
        String etag = etag(fit, ctx.path(), rep, requestKey, gzip);
        ctx.header("X-Fit-Id", Long.toString(fit.id()));
        ctx.header("X-Fit-Model", fit.model());
        ctx.header("X-Fit-As-Of", fit.asOf().toString());
        ctx.header("X-Fit-Created-At", fit.createdAt().toString());
        ctx.header("X-Caution", CAUTION);
        ctx.header("ETag", etag);
        ctx.header("Vary", "Accept, Accept-Encoding");
        // the default fit moves on with each refit: caches must revalidate (cheap with the ETag)
        ctx.header("Cache-Control", "no-cache");
        if (matches(ctx.header("If-None-Match"), etag)) {
            ctx.status(304);
            return;
        }
        ctx.status(200);
        // Javalin gives every response a UTF-8 character encoding, which Jetty appends to any
        // Content-Type as ;charset=utf-8: meaningless for bytes, so cleared for binary formats
        if (rep.binary) ctx.res().setCharacterEncoding(null);
        ctx.contentType(rep.contentType);
        if (gzip) ctx.header("Content-Encoding", "gzip");
        if (exactLength >= 0) ctx.header("Content-Length", Long.toString(exactLength));
        try {
            // the servlet stream, not ctx.outputStream(): compression is decided here, once
            OutputStream raw = ctx.res().getOutputStream();
            OutputStream plain = exactLength < 0 && approxBytes <= 2 * WHOLE_BODY_BYTES ? new WholeIfSmall(ctx, raw) : raw;
            try (OutputStream out = gzip ? new FastGzip(raw) : plain) {
                body.writeTo(out);
            }
        } catch (IOException e) {
            // the status line is out, so nothing more can be said to this client: it has gone away
            LOG.debug("request {}: client went away while the answer was written: {}", ctx.attribute(HttpApi.REQUEST_ID_ATTRIBUTE), e.toString());
        }
    }

    /** Largest body {@link WholeIfSmall} holds back to send in one piece with its length. */
    static final int WHOLE_BODY_BYTES = 128 * 1024;

    /**
     * Holds the body back while it is small: a body that ends within {@link #WHOLE_BODY_BYTES} goes
     * out in one write with a Content-Length (headers and body in one packet, no chunk framing and
     * no closing chunk: fewer system calls and wake-ups for the small answers that are most of the
     * traffic); one that grows beyond it is streamed chunked from there on, as before.
     */
    private static final class WholeIfSmall extends OutputStream {
        private final Context ctx;
        private final OutputStream raw;
        private byte[] held = new byte[8 * 1024];
        private int n;
        private boolean streaming;

        WholeIfSmall(Context ctx, OutputStream raw) {
            this.ctx = ctx;
            this.raw = raw;
        }

        @Override
        public void write(int b) throws IOException {
            write(new byte[] {(byte) b}, 0, 1);
        }

        @Override
        public void write(byte[] b, int off, int len) throws IOException {
            if (streaming) {
                raw.write(b, off, len);
            } else if (n + len <= WHOLE_BODY_BYTES) {
                if (n + len > held.length) held = java.util.Arrays.copyOf(held, Math.min(WHOLE_BODY_BYTES, Math.max(2 * held.length, n + len)));
                System.arraycopy(b, off, held, n, len);
                n += len;
            } else {
                streaming = true;
                raw.write(held, 0, n);
                held = null;
                raw.write(b, off, len);
            }
        }

        @Override
        public void close() throws IOException {
            if (!streaming) {
                ctx.res().setContentLength(n);
                raw.write(held, 0, n);
            }
            raw.close();
        }
    }

    /** Sends a binary body of known length (never compressed). */
    static void sendBinary(Context ctx, FitRef fit, Representation rep, byte[] requestKey, long length, Body body) {
        send(ctx, fit, rep, requestKey, length, false, length, body);
    }

    /** Sets a header listing names (tickers, dates), comma-separated; 406 when the list is too long for a header. */
    static void listHeader(Context ctx, String name, List<String> items) {
        String v = String.join(",", items);
        if (v.length() > MAX_LIST_HEADER_CHARS) {
            throw new ApiException(406, "not-acceptable", "Not acceptable", name + " would be " + v.length()
                    + " characters, above the " + MAX_LIST_HEADER_CHARS + " a header may carry; ask for JSON or CSV",
                    List.of(FieldError.field("Accept", "the binary format carries the list in a header; too long here")));
        }
        ctx.header(name, v);
    }

    static boolean acceptsGzip(String acceptEncoding) {
        if (acceptEncoding == null) return false;
        for (String part : acceptEncoding.split(",")) {
            String[] p = part.split(";");
            String coding = p[0].trim();
            if (!coding.equalsIgnoreCase("gzip") && !coding.equalsIgnoreCase("x-gzip")) continue;
            for (int i = 1; i < p.length; i++) {
                String param = p[i].trim();
                if (param.startsWith("q=") && param.substring(2).trim().matches("0(\\.0*)?")) return false;
            }
            return true;
        }
        return false;
    }

    /** If-None-Match uses the weak comparison (RFC 9110 section 13.1.2): a W/ prefix is ignored. */
    static boolean matches(String ifNoneMatch, String etag) {
        if (ifNoneMatch == null) return false;
        for (String tag : ifNoneMatch.split(",")) {
            String t = tag.trim();
            if (t.equals("*")) return true;
            if (t.startsWith("W/")) t = t.substring(2);
            if (t.equals(etag)) return true;
        }
        return false;
    }

    /** Strong tag: SHA-256 of fit id, path, format, normalised request and encoding (first 128 bits, base64url). */
    static String etag(FitRef fit, String path, Representation rep, byte[] requestKey, boolean gzip) {
        try {
            MessageDigest md = MessageDigest.getInstance("SHA-256");
            md.update((fit.id() + "\n" + fit.model() + "\n" + path + "\n" + rep + "\n" + (gzip ? "gzip" : "identity") + "\n")
                    .getBytes(StandardCharsets.UTF_8));
            md.update(requestKey);
            byte[] h = md.digest();
            return "\"" + Base64.getUrlEncoder().withoutPadding().encodeToString(java.util.Arrays.copyOf(h, 16)) + "\"";
        } catch (NoSuchAlgorithmException e) {
            throw new IllegalStateException("SHA-256 is required of every Java platform", e);
        }
    }

    /** gzip at the fastest level: a 5 MB matrix compresses several times faster than at the default level. */
    private static final class FastGzip extends GZIPOutputStream {
        FastGzip(OutputStream out) throws IOException {
            super(out, 64 * 1024);
            def.setLevel(Deflater.BEST_SPEED);
        }
    }
}
