package eigencov.http;

import io.javalin.http.Context;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The request log: one line per finished request ({@code <request id> <method> <path> <status>
 * <ms>ms}) on the logger {@value #NAME}, at a level chosen by what the request needs from an
 * operator:
 * <ul>
 * <li>{@code WARN}: the server failed (5xx);</li>
 * <li>{@code INFO}: the client's request was refused (4xx), or the request took at least the
 *     slow-request threshold (the line then ends in {@code slow});</li>
 * <li>{@code DEBUG}: everything else, i.e. every successful request in time. Off by default:
 *     at thousands of small queries a second a line each cost more CPU than the queries (the
 *     logger formats a timestamp and writes to stderr under a lock); switch it on with
 *     {@code -Dorg.slf4j.simpleLogger.log.eigencov.http.access=debug}.</li>
 * </ul>
 * The metrics ({@code http_server_requests_seconds}) still count every request.
 */
final class AccessLog {
    /** Logger name, so that the access log can be switched on alone. */
    static final String NAME = "eigencov.http.access";
    private static final Logger LOG = LoggerFactory.getLogger(NAME);

    enum Level { DEBUG, INFO, WARN }

    private final long slowNanos;

    /** @param slowRequestMs requests taking at least this long are logged at INFO whatever their status */
    AccessLog(long slowRequestMs) {
        if (slowRequestMs < 1) throw new IllegalArgumentException("slowRequestMs must be at least 1, was " + slowRequestMs);
        this.slowNanos = slowRequestMs * 1_000_000L;
    }

    /** The level of the line for a request that ended with {@code status} after {@code nanos}. */
    Level level(int status, long nanos) {
        if (status >= 500) return Level.WARN;
        if (status >= 400 || nanos >= slowNanos) return Level.INFO;
        return Level.DEBUG;
    }

    void finished(Context ctx, long nanos) {
        int status = ctx.statusCode();
        Level level = level(status, nanos);
        if (level == Level.DEBUG && !LOG.isDebugEnabled()) return;
        String slow = nanos >= slowNanos ? " slow" : "";
        long ms = Math.round(nanos / 1e6);
        Object id = ctx.attribute(HttpApi.REQUEST_ID_ATTRIBUTE);
        switch (level) {
            case WARN -> LOG.warn("{} {} {} {} {}ms{}", id, ctx.method(), ctx.path(), status, ms, slow);
            case INFO -> LOG.info("{} {} {} {} {}ms{}", id, ctx.method(), ctx.path(), status, ms, slow);
            case DEBUG -> LOG.debug("{} {} {} {} {}ms{}", id, ctx.method(), ctx.path(), status, ms, slow);
        }
    }
}
