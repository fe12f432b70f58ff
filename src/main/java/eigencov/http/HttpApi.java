package eigencov.http;

import com.fasterxml.jackson.core.JsonFactory;
import com.fasterxml.jackson.core.JsonProcessingException;
import com.fasterxml.jackson.core.StreamReadFeature;
import com.fasterxml.jackson.core.StreamWriteFeature;
import com.fasterxml.jackson.databind.DeserializationFeature;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.SerializationFeature;
import com.fasterxml.jackson.databind.json.JsonMapper;
import com.fasterxml.jackson.datatype.jsr310.JavaTimeModule;
import eigencov.service.ConflictException;
import eigencov.service.InvalidInputException;
import eigencov.service.NotFoundException;
import eigencov.service.UnavailableException;
import io.javalin.Javalin;
import io.javalin.http.Context;
import io.javalin.http.HttpResponseException;
import io.javalin.json.JavalinJackson;
import org.eclipse.jetty.server.handler.GracefulHandler;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

import java.sql.SQLException;
import java.sql.SQLTransientConnectionException;
import java.util.List;
import java.util.Map;
import java.util.UUID;
import java.util.concurrent.ThreadLocalRandom;
import java.util.regex.Pattern;
import java.util.function.BooleanSupplier;

/**
 * Builds the Javalin server: JSON mapping, problem+json error mapping, request ids and request
 * logging, and the operations endpoints; every other endpoint comes from a {@link RouteModule}.
 */
public final class HttpApi {
    private static final Logger LOG = LoggerFactory.getLogger("eigencov.http");
    public static final String REQUEST_ID = "X-Request-Id";
    /** The request's id among the Javalin context attributes. */
    static final String REQUEST_ID_ATTRIBUTE = "requestId";
    /** A request id a client may choose (anything else is replaced by one of ours). */
    private static final Pattern CLIENT_REQUEST_ID = Pattern.compile("[A-Za-z0-9._:-]{1,100}");
    /** Requests taking at least this long are logged at INFO although they succeeded. */
    public static final long DEFAULT_SLOW_REQUEST_MS = 1_000;
    /**
     * Most room for response headers: .npy answers list their row tickers in a header, and 3,000
     * names of up to 32 characters is about 100 KB. Jetty starts every response with its default
     * 8 KB header buffer and takes one this large only for a response whose headers overflow that.
     */
    static final int MAX_RESPONSE_HEADER_BYTES = 128 * 1024;

    private HttpApi() {
    }

    /** The one ObjectMapper of the process: strict on input, fast double writer on output. */
    public static ObjectMapper objectMapper() {
        JsonFactory factory = JsonFactory.builder()
                .enable(StreamWriteFeature.USE_FAST_DOUBLE_WRITER)
                .enable(StreamReadFeature.USE_FAST_DOUBLE_PARSER)
                .build();
        return JsonMapper.builder(factory)
                .addModule(new JavaTimeModule())
                .disable(SerializationFeature.WRITE_DATES_AS_TIMESTAMPS)
                .enable(DeserializationFeature.FAIL_ON_UNKNOWN_PROPERTIES)
                .enable(DeserializationFeature.FAIL_ON_NULL_FOR_PRIMITIVES)
                .enable(DeserializationFeature.FAIL_ON_TRAILING_TOKENS)
                .build();
    }

    /**
     * @param host         interface to bind
     * @param port         port (0 = any free)
     * @param maxBodyBytes largest request body read into memory by Javalin
     * @param stopGraceMs  how long a stop lets in-flight requests finish
     * @param ready        store reachability for /ready
     * @param keys         API keys checked before every request ({@link ApiKeys#none()} = open)
     * @param modules      the endpoint groups
     */
    public static Javalin create(String host, int port, long maxBodyBytes, long stopGraceMs, ObjectMapper mapper,
                                 BooleanSupplier ready, ApiKeys keys, List<RouteModule> modules) {
        return create(host, port, maxBodyBytes, stopGraceMs, mapper, ready, keys, modules, RequestObserver.NONE);
    }

    /** As above, telling {@code observer} about every finished request (route template, status, duration). */
    public static Javalin create(String host, int port, long maxBodyBytes, long stopGraceMs, ObjectMapper mapper,
                                 BooleanSupplier ready, ApiKeys keys, List<RouteModule> modules, RequestObserver observer) {
        return create(host, port, maxBodyBytes, stopGraceMs, DEFAULT_SLOW_REQUEST_MS, mapper, ready, keys, modules, observer);
    }

    /**
     * As above, with the request log's slow-request threshold ({@link AccessLog}: successful requests
     * are logged at DEBUG, failed or slower ones at INFO and above).
     */
    public static Javalin create(String host, int port, long maxBodyBytes, long stopGraceMs, long slowRequestMs, ObjectMapper mapper,
                                 BooleanSupplier ready, ApiKeys keys, List<RouteModule> modules, RequestObserver observer) {
        AccessLog accessLog = new AccessLog(slowRequestMs);
        return Javalin.create(config -> {
            config.startup.showJavalinBanner = false;
            config.startup.showOldJavalinVersionWarning = false;
            config.jetty.host = host;
            config.jetty.port = port;
            config.jetty.modifyServer(server -> {
                // A stop waits up to the stop timeout for Jetty's graceful components: the connector
                // stops accepting, GracefulHandler (Javalin attaches its handler inside it) lets the
                // requests in flight finish. A zero timeout would cut them off.
                server.setStopTimeout(stopGraceMs);
                server.setHandler(new GracefulHandler());
            });
            // Not setResponseHeaderSize: Jetty takes a buffer of that size for the headers of EVERY
            // response, and one of 128 KB is above its buffer pool's largest bucket (64 KB), so each
            // response allocated and zeroed a fresh direct buffer (freed only by GC): measured as the
            // largest single cost of small answers, and a source of GC work behind the latency tail.
            config.jetty.modifyHttpConfiguration(http -> http.setMaxResponseHeaderSize(MAX_RESPONSE_HEADER_BYTES));
            config.http.maxRequestSize = maxBodyBytes;
            config.http.defaultContentType = "application/json";
            config.jsonMapper(new JavalinJackson(mapper, false));
            config.requestLogger.http((ctx, ms) -> {
                long nanos = (long) (ms * 1_000_000.0);
                accessLog.finished(ctx, nanos);
                observer.finished(ctx.method().name(), routeOf(ctx), ctx.statusCode(), nanos);
            });

            // one filter for both: each before-filter is matched against every request
            config.routes.before(ctx -> {
                String id = ctx.header(REQUEST_ID);
                if (id == null || !CLIENT_REQUEST_ID.matcher(id).matches()) id = newRequestId();
                ctx.attribute(REQUEST_ID_ATTRIBUTE, id);
                ctx.header(REQUEST_ID, id);
                keys.authorize(ctx);
            });

            config.routes.get("/health", ctx -> ctx.json(Map.of("status", "up")));
            config.routes.get("/ready", ctx -> {
                if (ready.getAsBoolean()) {
                    ctx.json(Map.of("status", "ready"));
                } else {
                    throw new ApiException(503, "not-ready", "Not ready", "the store is not reachable", List.of());
                }
            });
            config.routes.get("/openapi.yaml", ctx -> {
                var in = HttpApi.class.getClassLoader().getResourceAsStream("openapi/eigencov.yaml");
                if (in == null) throw new ApiException(404, "not-found", "Not found", "the OpenAPI document is not packaged", List.of());
                ctx.contentType("application/yaml").result(in);
            });
            for (RouteModule m : modules) m.register(config.routes);

            config.routes.exception(ApiException.class, (e, ctx) -> problem(ctx, e));
            config.routes.exception(NotFoundException.class, (e, ctx) -> problem(ctx,
                    new ApiException(404, "not-found", e.what() + " not found", e.getMessage(), List.of())));
            config.routes.exception(InvalidInputException.class, (e, ctx) -> problem(ctx,
                    new ApiException(e.unprocessable() ? 422 : 400, e.type(), e.unprocessable() ? "Cannot process request" : "Invalid request",
                            e.getMessage(), e.issues().stream().map(i -> new FieldError(i.row(), i.field(), i.message())).toList())));
            config.routes.exception(ConflictException.class, (e, ctx) -> problem(ctx,
                    new ApiException(409, "conflict", "Conflict", e.getMessage(), List.of())));
            config.routes.exception(UnavailableException.class, (e, ctx) -> unavailable(ctx, e.getMessage()));
            config.routes.exception(JsonProcessingException.class, (e, ctx) -> {
                String what = JsonErrors.describe(e);
                problem(ctx, ApiException.badRequest("request body is not valid JSON for this endpoint: " + what,
                        List.of(FieldError.field(jsonPath(e), what))));
            });
            config.routes.exception(HttpResponseException.class, (e, ctx) -> problem(ctx,
                    new ApiException(e.getStatus() >= 400 ? e.getStatus() : 500, slug(e.getStatus()), titleOf(e.getStatus()),
                            e.getMessage(), List.of())));
            config.routes.exception(Exception.class, (e, ctx) -> {
                if (storeUnreachable(e)) {
                    // Any store path, not only those that translate it: a lost database is a 503 to retry, not a 500.
                    unavailable(ctx, "the store is not reachable right now");
                    return;
                }
                LOG.error("request {} {} {} failed", ctx.attribute(REQUEST_ID_ATTRIBUTE), ctx.method(), ctx.path(), e);
                problem(ctx, new ApiException(500, "internal", "Internal error",
                        "the server could not complete the request; quote request id " + ctx.attribute(REQUEST_ID_ATTRIBUTE), List.of()));
            });
            config.routes.error(404, ctx -> {
                if (!isProblem(ctx)) problem(ctx, new ApiException(404, "not-found", "Not found", "no endpoint " + ctx.method() + " " + ctx.path(), List.of()));
            });
            config.routes.error(405, ctx -> {
                if (!isProblem(ctx)) problem(ctx, new ApiException(405, "method-not-allowed", "Method not allowed", ctx.method() + " is not allowed on " + ctx.path(), List.of()));
            });
        });
    }

    /**
     * A fresh request id in the random-UUID layout. From {@link ThreadLocalRandom}, not
     * {@code UUID.randomUUID()}: a request id only has to be unique enough to find a request in the
     * logs, not unguessable, and SecureRandom is a synchronised, comparatively slow source that every
     * request went through.
     */
    static String newRequestId() {
        ThreadLocalRandom r = ThreadLocalRandom.current();
        long msb = (r.nextLong() & ~0xF000L) | 0x4000L; // version 4
        long lsb = (r.nextLong() & 0x3FFF_FFFF_FFFF_FFFFL) | 0x8000_0000_0000_0000L; // IETF variant
        return new UUID(msb, lsb).toString();
    }

    /** Route label of a request that matched no route (keeps scanners from adding a series per path). */
    public static final String UNMATCHED_ROUTE = "unmatched";

    /** The route template the request matched, never the raw path. */
    static String routeOf(Context ctx) {
        try {
            var endpoint = ctx.endpoints().matchedHttpEndpoint();
            return endpoint == null ? UNMATCHED_ROUTE : endpoint.path;
        } catch (RuntimeException e) {
            return UNMATCHED_ROUTE;
        }
    }

    private static void unavailable(Context ctx, String detail) {
        LOG.warn("request {} {} {}: {}", ctx.attribute(REQUEST_ID_ATTRIBUTE), ctx.method(), ctx.path(), detail);
        ctx.header("Retry-After", "5");
        problem(ctx, new ApiException(503, "unavailable", "Service unavailable", detail, List.of()));
    }

    /**
     * True when {@code e} was caused by losing the database: the pool timed out waiting for a
     * connection, or the driver reports SQLSTATE class 08 (connection exception) or 57P
     * (server shutting down, or not yet accepting connections).
     */
    static boolean storeUnreachable(Throwable e) {
        for (Throwable t = e; t != null; t = t.getCause()) {
            if (t instanceof SQLTransientConnectionException) return true;
            if (t instanceof SQLException s && s.getSQLState() != null
                    && (s.getSQLState().startsWith("08") || s.getSQLState().startsWith("57P"))) return true;
            if (t.getCause() == t) break;
        }
        return false;
    }

    private static boolean isProblem(Context ctx) {
        String ct = ctx.res().getContentType();
        return ct != null && ct.startsWith(Problem.CONTENT_TYPE);
    }

    /** Writes {@code e} as problem+json. */
    public static void problem(Context ctx, ApiException e) {
        ctx.status(e.status());
        ctx.contentType(Problem.CONTENT_TYPE);
        ctx.result(toJson(ctx, Problem.of(e, ctx.path())));
    }

    private static String toJson(Context ctx, Object o) {
        return ctx.jsonMapper().toJsonString(o, o.getClass());
    }

    private static String jsonPath(JsonProcessingException e) {
        if (e instanceof com.fasterxml.jackson.databind.JsonMappingException jm && !jm.getPath().isEmpty()) {
            StringBuilder sb = new StringBuilder();
            for (var ref : jm.getPath()) {
                if (ref.getFieldName() != null) {
                    if (sb.length() > 0) sb.append('.');
                    sb.append(ref.getFieldName());
                } else if (ref.getIndex() >= 0) {
                    sb.append('[').append(ref.getIndex()).append(']');
                }
            }
            return sb.toString();
        }
        return "body";
    }

    private static String slug(int status) {
        return switch (status) {
            case 400 -> "validation";
            case 401 -> "unauthorized";
            case 403 -> "forbidden";
            case 404 -> "not-found";
            case 405 -> "method-not-allowed";
            case 406 -> "not-acceptable";
            case 413 -> "body-too-large";
            case 415 -> "unsupported-media-type";
            case 503 -> "unavailable";
            default -> "http-" + status;
        };
    }

    private static String titleOf(int status) {
        return switch (status) {
            case 400 -> "Invalid request";
            case 401 -> "Unauthorized";
            case 403 -> "Forbidden";
            case 404 -> "Not found";
            case 405 -> "Method not allowed";
            case 406 -> "Not acceptable";
            case 413 -> "Request body too large";
            case 415 -> "Unsupported media type";
            case 503 -> "Service unavailable";
            default -> "HTTP " + status;
        };
    }
}
