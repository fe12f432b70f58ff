package eigencov.http;

import com.fasterxml.jackson.core.JsonParser;
import com.fasterxml.jackson.databind.DeserializationFeature;
import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.ObjectReader;
import com.fasterxml.jackson.databind.annotation.JsonDeserialize;
import eigencov.service.CovarianceAnswer;
import eigencov.service.CovarianceForm;
import eigencov.service.CovarianceMatrix;
import eigencov.service.CovarianceQuery;
import eigencov.service.ExposuresQuery;
import eigencov.service.FactorForm;
import eigencov.service.MinimumVarianceQuery;
import eigencov.service.PrecisionQuery;
import eigencov.service.QueryService;
import eigencov.service.RiskQuery;
import eigencov.service.Weights;
import io.javalin.config.RoutesConfig;
import io.javalin.http.Context;

import java.io.IOException;
import java.nio.ByteBuffer;
import java.nio.charset.StandardCharsets;
import java.util.HashSet;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.regex.Pattern;

/**
 * The query endpoints (docs/design.md section 4, "Queries"). Each handler parses and validates the
 * request, calls one {@link QueryService} method and maps the answer with {@link QueryResponses}.
 *
 * <p>Every endpoint takes the query parameters {@code asOf=YYYY-MM-DD} or {@code fit=ID} (not both;
 * default the newest fit) and, where tickers are named, {@code missing=error|omit}; POST bodies hold
 * only the request itself. Formats by {@code Accept}: covariance (matrix form), precision, exposures
 * and factor returns in JSON, CSV and {@code .npy}; the covariance factor form, factors, risk and
 * minimum variance in JSON only (a factor form is several arrays: over CSV or {@code .npy} ask for
 * {@code /exposures} and {@code /factors} instead); anything else is a 406 problem.
 */
public final class QueryRoutes implements RouteModule {
    private static final Pattern MODEL_NAME = Pattern.compile("[A-Za-z0-9._-]{1,64}");
    private static final List<Representation> TABULAR = List.of(Representation.JSON, Representation.CSV, Representation.NPY);
    private static final List<Representation> JSON_ONLY = List.of(Representation.JSON);
    private static final Map<String, CovarianceForm> FORMS = Map.of("matrix", CovarianceForm.MATRIX, "factor", CovarianceForm.FACTOR);
    private static final Set<String> COVARIANCE_GET = with(QueryParams.SELECTION, "tickers", "form", "scale", "horizonDays", "correlation");
    private static final Set<String> EXPOSURES_GET = with(QueryParams.SELECTION, "tickers");
    private static final Set<String> FIT_ONLY = Set.of("asOf", "fit");
    private static final Set<String> FACTOR_RETURNS = with(FIT_ONLY, "from", "to");

    private final QueryService service;
    private final long maxBodyBytes;
    private final QueryResponses responses;
    private final ObjectReader covarianceBody;
    private final ObjectReader exposuresBody;
    private final ObjectReader riskBody;
    private final ObjectReader precisionBody;
    private final ObjectReader minimumVarianceBody;

    /** @param maxBodyBytes largest request body read (413 above), counted on the stream */
    public QueryRoutes(QueryService service, ObjectMapper mapper, long maxBodyBytes) {
        this.service = service;
        this.maxBodyBytes = maxBodyBytes;
        this.responses = new QueryResponses();
        this.covarianceBody = strictReader(mapper, CovarianceBody.class);
        this.exposuresBody = strictReader(mapper, ExposuresBody.class);
        // repeated keys are found by RiskBodyDeserializer and RiskQuery, not by the parser (see there)
        this.riskBody = mapper.readerFor(RiskBody.class).without(DeserializationFeature.ACCEPT_FLOAT_AS_INT);
        this.precisionBody = strictReader(mapper, PrecisionBody.class);
        this.minimumVarianceBody = strictReader(mapper, MinimumVarianceBody.class);
    }

    /**
     * Reads a JSON body strictly: repeated keys (a ticker twice in weights) and fractional numbers
     * for whole-number fields are errors, not silently resolved.
     */
    private static ObjectReader strictReader(ObjectMapper mapper, Class<?> type) {
        return mapper.readerFor(type)
                .with(JsonParser.Feature.STRICT_DUPLICATE_DETECTION)
                .without(DeserializationFeature.ACCEPT_FLOAT_AS_INT);
    }

    /** POST /covariance body. */
    record CovarianceBody(List<String> tickers, String form, String scale, Integer horizonDays, Boolean correlation) {
    }

    /** POST /exposures body. */
    record ExposuresBody(List<String> tickers) {
    }

    /** POST /precision body. */
    record PrecisionBody(List<String> tickers, String scale, Integer horizonDays) {
    }

    /** POST /minimum-variance body; budget is read as a node so that only a JSON number is taken (not "1"). */
    record MinimumVarianceBody(List<String> tickers, JsonNode budget, String scale, Integer horizonDays) {
    }

    /** POST /risk body. */
    @JsonDeserialize(using = RiskBodyDeserializer.class)
    record RiskBody(Weights weights, Weights benchmark, String scale, Integer horizonDays) {
    }

    @Override
    public void register(RoutesConfig routes) {
        routes.get("/v1/models/{model}/covariance", this::covarianceGet);
        routes.post("/v1/models/{model}/covariance", this::covariancePost);
        routes.get("/v1/models/{model}/exposures", this::exposuresGet);
        routes.post("/v1/models/{model}/exposures", this::exposuresPost);
        routes.get("/v1/models/{model}/factors", this::factors);
        routes.get("/v1/models/{model}/factor-returns", this::factorReturns);
        routes.post("/v1/models/{model}/risk", this::risk);
        routes.post("/v1/models/{model}/precision", this::precision);
        routes.post("/v1/models/{model}/minimum-variance", this::minimumVariance);
    }

    private void covarianceGet(Context ctx) {
        QueryParams p = QueryParams.of(ctx.queryParamMap(), COVARIANCE_GET);
        Representation rep = Representation.negotiate(ctx.header("Accept"), TABULAR);
        CovarianceQuery q = new CovarianceQuery(p.list("tickers"), QueryParams.choice("form", p.single("form"), FORMS, CovarianceForm.MATRIX),
                QueryParams.scale(p.single("scale"), p.integer("horizonDays")), p.bool("correlation"), p.missing());
        covariance(ctx, p, rep, q);
    }

    private void covariancePost(Context ctx) throws IOException {
        QueryParams p = QueryParams.of(ctx.queryParamMap(), QueryParams.SELECTION);
        Representation rep = Representation.negotiate(ctx.header("Accept"), TABULAR);
        CovarianceBody b = body(ctx, covarianceBody);
        CovarianceQuery q = new CovarianceQuery(b.tickers(), QueryParams.choice("form", b.form(), FORMS, CovarianceForm.MATRIX),
                QueryParams.scale(b.scale(), b.horizonDays()), Boolean.TRUE.equals(b.correlation()), p.missing());
        covariance(ctx, p, rep, q);
    }

    private void covariance(Context ctx, QueryParams p, Representation rep, CovarianceQuery q) {
        if (q.form() == CovarianceForm.FACTOR && rep != Representation.JSON) {
            throw new ApiException(406, "not-acceptable", "Not acceptable", "the factor form is answered in JSON only; for "
                    + rep.mediaType + " ask for /exposures and /factors, or form=matrix",
                    List.of(FieldError.field("Accept", "factor form is JSON only")));
        }
        CovarianceAnswer a = service.covariance(model(ctx), p.selector(), q);
        byte[] key = key("covariance|" + q.form() + "|" + scaleKey(q.scale()) + "|" + q.correlation() + "|" + q.missing()
                + "|" + String.join(",", q.tickers()));
        if (a instanceof CovarianceMatrix m) {
            responses.covarianceMatrix(ctx, rep, m, key);
        } else {
            responses.factorForm(ctx, (FactorForm) a, key);
        }
    }

    private void exposuresGet(Context ctx) {
        QueryParams p = QueryParams.of(ctx.queryParamMap(), EXPOSURES_GET);
        Representation rep = Representation.negotiate(ctx.header("Accept"), TABULAR);
        exposures(ctx, p, rep, new ExposuresQuery(p.list("tickers"), p.missing()));
    }

    private void exposuresPost(Context ctx) throws IOException {
        QueryParams p = QueryParams.of(ctx.queryParamMap(), QueryParams.SELECTION);
        Representation rep = Representation.negotiate(ctx.header("Accept"), TABULAR);
        exposures(ctx, p, rep, new ExposuresQuery(this.<ExposuresBody>body(ctx, exposuresBody).tickers(), p.missing()));
    }

    private void exposures(Context ctx, QueryParams p, Representation rep, ExposuresQuery q) {
        responses.exposures(ctx, rep, service.exposures(model(ctx), p.selector(), q), key("exposures|" + q.missing() + "|" + String.join(",", q.tickers())));
    }

    private void factors(Context ctx) {
        QueryParams p = QueryParams.of(ctx.queryParamMap(), FIT_ONLY);
        Representation.negotiate(ctx.header("Accept"), JSON_ONLY);
        responses.factors(ctx, service.factors(model(ctx), p.selector()), key("factors"));
    }

    private void factorReturns(Context ctx) {
        QueryParams p = QueryParams.of(ctx.queryParamMap(), FACTOR_RETURNS);
        Representation rep = Representation.negotiate(ctx.header("Accept"), TABULAR);
        var from = p.date("from");
        var to = p.date("to");
        responses.factorReturns(ctx, rep, service.factorReturns(model(ctx), p.selector(), from, to),
                key("factor-returns from=" + from + " to=" + to));
    }

    private void risk(Context ctx) throws IOException {
        QueryParams p = QueryParams.of(ctx.queryParamMap(), QueryParams.SELECTION);
        Representation.negotiate(ctx.header("Accept"), JSON_ONLY);
        RiskBody b = body(ctx, riskBody);
        RiskQuery q = new RiskQuery(b.weights(), b.benchmark(), QueryParams.scale(b.scale(), b.horizonDays()), p.missing());
        responses.risk(ctx, service.risk(model(ctx), p.selector(), q), riskKey(q));
    }

    private void precision(Context ctx) throws IOException {
        QueryParams p = QueryParams.of(ctx.queryParamMap(), QueryParams.SELECTION);
        Representation rep = Representation.negotiate(ctx.header("Accept"), TABULAR);
        PrecisionBody b = body(ctx, precisionBody);
        PrecisionQuery q = new PrecisionQuery(b.tickers(), QueryParams.scale(b.scale(), b.horizonDays()), p.missing());
        responses.precision(ctx, rep, service.precision(model(ctx), p.selector(), q),
                key("precision|" + scaleKey(q.scale()) + "|" + q.missing() + "|" + String.join(",", q.tickers())));
    }

    private void minimumVariance(Context ctx) throws IOException {
        QueryParams p = QueryParams.of(ctx.queryParamMap(), QueryParams.SELECTION);
        Representation.negotiate(ctx.header("Accept"), JSON_ONLY);
        MinimumVarianceBody b = body(ctx, minimumVarianceBody);
        double budget = MinimumVarianceQuery.DEFAULT_BUDGET;
        if (b.budget() != null && !b.budget().isNull()) {
            if (!b.budget().isNumber()) throw ApiException.badField("budget", "must be a JSON number, was " + b.budget());
            budget = b.budget().doubleValue();
        }
        MinimumVarianceQuery q = new MinimumVarianceQuery(b.tickers(), budget, QueryParams.scale(b.scale(), b.horizonDays()), p.missing());
        responses.minimumVariance(ctx, service.minimumVariance(model(ctx), p.selector(), q),
                key("minimum-variance|" + Double.doubleToLongBits(q.budget()) + "|" + scaleKey(q.scale()) + "|" + q.missing() + "|"
                        + String.join(",", q.tickers())));
    }

    private static byte[] key(String normalised) {
        return normalised.getBytes(StandardCharsets.UTF_8);
    }

    /**
     * The normalised request for the ETag, as bytes: each ticker (ASCII, checked by RiskQuery) and the
     * exact bits of its weight. Building it as text (decimal, then hex digits) cost more than the
     * risk itself for a 3,000-name portfolio.
     */
    private static byte[] riskKey(RiskQuery q) {
        byte[] head = key("risk|" + scaleKey(q.scale()) + "|" + q.missing() + "|weights");
        int size = head.length + keyBytes(q.weights()) + (q.benchmark() == null ? 0 : BENCHMARK_KEY.length + keyBytes(q.benchmark()));
        ByteBuffer b = ByteBuffer.allocate(size);
        b.put(head);
        putWeights(b, q.weights());
        if (q.benchmark() != null) putWeights(b.put(BENCHMARK_KEY), q.benchmark());
        return b.array();
    }

    private static final byte[] BENCHMARK_KEY = key("|benchmark");

    /** ",TICKER=" and eight bytes of weight per name. */
    private static int keyBytes(Weights w) {
        int n = 0;
        for (int i = 0; i < w.size(); i++) n += w.ticker(i).length() + 10;
        return n;
    }

    private static void putWeights(ByteBuffer b, Weights w) {
        for (int i = 0; i < w.size(); i++) {
            String t = w.ticker(i);
            b.put((byte) ',');
            for (int c = 0; c < t.length(); c++) b.put((byte) t.charAt(c));
            b.put((byte) '=').putLong(Double.doubleToLongBits(w.weight(i)));
        }
    }

    private static String scaleKey(eigencov.service.Scale s) {
        return s.name() + ":" + s.days();
    }

    private static String model(Context ctx) {
        String m = ctx.pathParam("model");
        if (!MODEL_NAME.matcher(m).matches()) throw ApiException.badField("model", "must match [A-Za-z0-9._-]{1,64}, was '" + m + "'");
        return m;
    }

    /**
     * Parses the body straight from the request stream: reading it into an array first (Javalin's
     * bodyAsBytes: a growing buffer, then a copy) cost more than the parse for a 3,000-weight
     * portfolio. The size limit is counted on the stream, as for uploads.
     */
    private <T> T body(Context ctx, ObjectReader reader) throws IOException {
        if (ctx.req().getContentLengthLong() > maxBodyBytes) throw LimitedBody.tooLarge(maxBodyBytes);
        // a JsonProcessingException goes to HttpApi's mapper: 400 naming the JSON path
        T value = reader.readValue(new LimitedBody(ctx.bodyInputStream(), maxBodyBytes));
        if (value == null) throw ApiException.badField("body", "a JSON object is required");
        return value;
    }

    private static Set<String> with(Set<String> base, String... more) {
        Set<String> s = new HashSet<>(base);
        s.addAll(List.of(more));
        return Set.copyOf(s);
    }
}
