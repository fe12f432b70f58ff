package eigencov.http;

import com.fasterxml.jackson.core.JsonEncoding;
import com.fasterxml.jackson.core.JsonGenerator;
import com.fasterxml.jackson.core.io.NumberOutput;
import com.fasterxml.jackson.databind.ObjectMapper;
import eigencov.math.ActiveRisk;
import eigencov.math.PortfolioRisk;
import eigencov.service.CovarianceMatrix;
import eigencov.service.FactorForm;
import eigencov.service.FactorReturnSeries;
import eigencov.service.FactorSpectrum;
import eigencov.service.FitRef;
import eigencov.service.RiskAnswer;
import eigencov.service.Scale;
import io.javalin.http.Context;

import java.io.BufferedWriter;
import java.io.IOException;
import java.io.OutputStream;
import java.io.OutputStreamWriter;
import java.io.Writer;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.List;

/**
 * Writes query answers as JSON, CSV or {@code .npy}. JSON is streamed with Jackson's
 * {@link JsonGenerator} (fast double writer, see {@link HttpApi#objectMapper()}) straight to the
 * response, with no intermediate tree; CSV numbers use the same shortest-repr writer; {@code .npy}
 * is one buffer (see {@link Npy}).
 *
 * <p>Formats: JSON matrices are arrays of rows. CSV has a header row; a covariance matrix's first
 * column is the ticker. {@code .npy} rows follow the answered tickers (or dates), listed in the
 * {@code X-Tickers} (or {@code X-Dates}) header; requested tickers left out under missing=omit are
 * in {@code X-Omitted} for CSV and {@code .npy}, and in {@code "omitted"} for JSON.
 */
final class QueryResponses {
    /** Rough JSON size of one double (digits, exponent, separator), for the compression decision. */
    private static final int BYTES_PER_NUMBER = 22;

    private final ObjectMapper mapper;

    QueryResponses(ObjectMapper mapper) {
        this.mapper = mapper;
    }

    void covarianceMatrix(Context ctx, Representation rep, CovarianceMatrix a, String key) {
        int n = a.tickers().size();
        double[] m = a.matrix();
        long size = (long) n * n * BYTES_PER_NUMBER;
        switch (rep) {
            case JSON -> json(ctx, a.fit(), key, size, g -> {
                g.writeStringField("form", "matrix");
                writeScale(g, a.scale());
                g.writeBooleanField("correlation", a.correlation());
                strings(g, "tickers", a.tickers());
                strings(g, "omitted", a.omitted());
                rows(g, "matrix", m, n, n);
            });
            case CSV -> {
                omittedHeader(ctx, a.omitted());
                csv(ctx, a.fit(), key, size, w -> {
                    w.write("ticker");
                    for (String t : a.tickers()) w.append(',').write(t);
                    w.write('\n');
                    for (int r = 0; r < n; r++) {
                        w.write(a.tickers().get(r));
                        csvRow(w, m, r * n, n);
                    }
                });
            }
            case NPY -> {
                ResponseSender.listHeader(ctx, "X-Tickers", a.tickers());
                omittedHeader(ctx, a.omitted());
                ResponseSender.sendBytes(ctx, a.fit(), rep, key, Npy.matrix(n, n, m));
            }
        }
    }

    void factorForm(Context ctx, FactorForm a, String key) {
        int n = a.tickers().size();
        int k = a.factors();
        json(ctx, a.fit(), key, (long) n * (k + 1) * BYTES_PER_NUMBER, g -> {
            g.writeStringField("form", "factor");
            writeScale(g, a.scale());
            g.writeNumberField("factors", k);
            strings(g, "tickers", a.tickers());
            strings(g, "omitted", a.omitted());
            rows(g, "exposures", a.exposures(), n, k);
            rows(g, "factorCovariance", a.factorCovariance(), k, k);
            numbers(g, "specificVariance", a.specificVariance());
        });
    }

    /**
     * Exposures: JSON {@code exposures} (n x k) and {@code specificVariance}; CSV columns
     * {@code ticker,f1..fk,specificVariance}; {@code .npy} an n x (k+1) matrix whose last column is
     * the specific variance (columns named in {@code X-Columns}).
     */
    void exposures(Context ctx, Representation rep, FactorForm a, String key) {
        int n = a.tickers().size();
        int k = a.factors();
        long size = (long) n * (k + 1) * BYTES_PER_NUMBER;
        double[] b = a.exposures();
        double[] d = a.specificVariance();
        switch (rep) {
            case JSON -> json(ctx, a.fit(), key, size, g -> {
                g.writeNumberField("factors", k);
                strings(g, "tickers", a.tickers());
                strings(g, "omitted", a.omitted());
                rows(g, "exposures", b, n, k);
                numbers(g, "specificVariance", d);
            });
            case CSV -> {
                omittedHeader(ctx, a.omitted());
                csv(ctx, a.fit(), key, size, w -> {
                    w.write("ticker," + String.join(",", factorColumns(k)) + ",specificVariance\n");
                    double[] row = new double[k + 1];
                    for (int r = 0; r < n; r++) {
                        System.arraycopy(b, r * k, row, 0, k);
                        row[k] = d[r];
                        w.write(a.tickers().get(r));
                        csvRow(w, row, 0, k + 1);
                    }
                });
            }
            case NPY -> {
                double[] out = new double[n * (k + 1)];
                for (int r = 0; r < n; r++) {
                    System.arraycopy(b, r * k, out, r * (k + 1), k);
                    out[r * (k + 1) + k] = d[r];
                }
                List<String> columns = new ArrayList<>(factorColumns(k));
                columns.add("specificVariance");
                ctx.header("X-Columns", String.join(",", columns));
                ResponseSender.listHeader(ctx, "X-Tickers", a.tickers());
                omittedHeader(ctx, a.omitted());
                ResponseSender.sendBytes(ctx, a.fit(), rep, key, Npy.matrix(n, k + 1, out));
            }
        }
    }

    void factors(Context ctx, FactorSpectrum a, String key) {
        int k = a.factors();
        json(ctx, a.fit(), key, (long) (k * k + 2 * a.eigenvalues().length) * BYTES_PER_NUMBER, g -> {
            g.writeNumberField("factors", k);
            rows(g, "factorCovariance", a.factorCovariance(), k, k);
            numbers(g, "eigenvalues", a.eigenvalues());
            numbers(g, "varianceShare", a.varianceShare());
            g.writeNumberField("explainedShare", a.explainedShare());
        });
    }

    /** Factor returns: JSON {@code dates} and {@code factorReturns} (dates x k); CSV {@code date,f1..fk}; {@code .npy} dates x k with {@code X-Dates}. */
    void factorReturns(Context ctx, Representation rep, FactorReturnSeries a, String key) {
        int t = a.dates().size();
        int k = a.factors();
        double[] v = a.values();
        long size = (long) t * k * BYTES_PER_NUMBER;
        switch (rep) {
            case JSON -> json(ctx, a.fit(), key, size, g -> {
                g.writeNumberField("factors", k);
                g.writeArrayFieldStart("dates");
                for (var d : a.dates()) g.writeString(d.toString());
                g.writeEndArray();
                rows(g, "factorReturns", v, t, k);
            });
            case CSV -> csv(ctx, a.fit(), key, size, w -> {
                w.write("date," + String.join(",", factorColumns(k)) + "\n");
                for (int r = 0; r < t; r++) {
                    w.write(a.dates().get(r).toString());
                    csvRow(w, v, r * k, k);
                }
            });
            case NPY -> {
                ResponseSender.listHeader(ctx, "X-Dates", a.dates().stream().map(Object::toString).toList());
                ResponseSender.sendBytes(ctx, a.fit(), rep, key, Npy.matrix(t, k, v));
            }
        }
    }

    void risk(Context ctx, RiskAnswer a, String key) {
        PortfolioRisk r = a.risk();
        int n = a.tickers().size();
        json(ctx, a.fit(), key, (long) n * 6 * BYTES_PER_NUMBER, g -> {
            writeScale(g, a.scale());
            g.writeNumberField("volatility", r.volatility());
            g.writeNumberField("variance", r.variance());
            g.writeNumberField("factorVariance", r.factorVariance());
            g.writeNumberField("specificVariance", r.specificVariance());
            if (r.trackingError() != null) g.writeNumberField("trackingError", r.trackingError());
            g.writeNumberField("betaToFirstFactor", r.betaToFirstFactor());
            byFactor(g, r.factorExposures(), r.factorContributions());
            double[] w = a.weights();
            double[] mcr = r.marginal();
            double[] ccr = r.contribution();
            double[] spec = r.specificContributions();
            double[] beta = r.assetBetasToFirstFactor();
            g.writeNumberField("specificContribution", sum(spec));
            g.writeArrayFieldStart("byAsset");
            for (int i = 0; i < n; i++) {
                g.writeStartObject();
                g.writeStringField("ticker", a.tickers().get(i));
                g.writeNumberField("weight", w[i]);
                g.writeNumberField("marginal", mcr[i]);
                g.writeNumberField("contribution", ccr[i]);
                g.writeNumberField("specificContribution", spec[i]);
                g.writeNumberField("betaToFirstFactor", beta[i]);
                g.writeEndObject();
            }
            g.writeEndArray();
            if (r.active() != null) active(g, r.active(), a.activeTickers());
            strings(g, "omitted", a.omitted());
        });
    }

    /** Tracking error decomposed over the union of portfolio and benchmark names (active weights a = w - benchmark). */
    private static void active(JsonGenerator g, ActiveRisk act, List<String> tickers) throws IOException {
        g.writeObjectFieldStart("active");
        g.writeNumberField("trackingError", act.trackingError());
        g.writeNumberField("variance", act.variance());
        byFactor(g, act.factorExposures(), act.factorContributions());
        double[] aw = act.activeWeights();
        double[] mcr = act.marginal();
        double[] ccr = act.contribution();
        double[] spec = act.specificContributions();
        g.writeNumberField("specificContribution", sum(spec));
        g.writeArrayFieldStart("byAsset");
        for (int i = 0; i < aw.length; i++) {
            g.writeStartObject();
            g.writeStringField("ticker", tickers.get(i));
            g.writeNumberField("activeWeight", aw[i]);
            g.writeNumberField("marginal", mcr[i]);
            g.writeNumberField("contribution", ccr[i]);
            g.writeNumberField("specificContribution", spec[i]);
            g.writeEndObject();
        }
        g.writeEndArray();
        g.writeEndObject();
    }

    /** "byFactor": [{factor (1-based), exposure, contribution}]. */
    private static void byFactor(JsonGenerator g, double[] exposure, double[] contribution) throws IOException {
        g.writeArrayFieldStart("byFactor");
        for (int j = 0; j < exposure.length; j++) {
            g.writeStartObject();
            g.writeNumberField("factor", j + 1);
            g.writeNumberField("exposure", exposure[j]);
            g.writeNumberField("contribution", contribution[j]);
            g.writeEndObject();
        }
        g.writeEndArray();
    }

    private static double sum(double[] v) {
        double s = 0;
        for (double x : v) s += x;
        return s;
    }

    // ---- JSON ----

    private interface JsonFields {
        void write(JsonGenerator g) throws IOException;
    }

    /** An object holding "fit", "caution", then {@code fields}. */
    private void json(Context ctx, FitRef fit, String key, long approxBytes, JsonFields fields) {
        ResponseSender.send(ctx, fit, Representation.JSON, key, approxBytes, true, out -> {
            try (JsonGenerator g = mapper.createGenerator(out, JsonEncoding.UTF8)) {
                g.writeStartObject();
                g.writeObjectFieldStart("fit");
                g.writeNumberField("id", fit.id());
                g.writeStringField("model", fit.model());
                g.writeStringField("asOf", fit.asOf().toString());
                g.writeStringField("createdAt", fit.createdAt().toString());
                g.writeEndObject();
                g.writeStringField("caution", ResponseSender.CAUTION);
                fields.write(g);
                g.writeEndObject();
            }
        });
    }

    private static void writeScale(JsonGenerator g, Scale s) throws IOException {
        g.writeObjectFieldStart("scale");
        g.writeStringField("name", s.name());
        g.writeNumberField("days", s.days());
        g.writeEndObject();
    }

    private static void strings(JsonGenerator g, String name, List<String> values) throws IOException {
        g.writeArrayFieldStart(name);
        for (String s : values) g.writeString(s);
        g.writeEndArray();
    }

    private static void numbers(JsonGenerator g, String name, double[] values) throws IOException {
        g.writeArrayFieldStart(name);
        for (double v : values) g.writeNumber(v);
        g.writeEndArray();
    }

    /** A rows x cols row-major matrix as an array of row arrays. */
    private static void rows(JsonGenerator g, String name, double[] m, int rows, int cols) throws IOException {
        g.writeArrayFieldStart(name);
        for (int r = 0; r < rows; r++) {
            g.writeStartArray();
            int off = r * cols;
            for (int c = 0; c < cols; c++) g.writeNumber(m[off + c]);
            g.writeEndArray();
        }
        g.writeEndArray();
    }

    // ---- CSV ----

    private interface CsvBody {
        void write(Writer w) throws IOException;
    }

    private static void csv(Context ctx, FitRef fit, String key, long approxBytes, CsvBody body) {
        ResponseSender.send(ctx, fit, Representation.CSV, key, approxBytes, true, out -> {
            try (Writer w = new BufferedWriter(new OutputStreamWriter(out, StandardCharsets.UTF_8), 64 * 1024)) {
                body.write(w);
            }
        });
    }

    /** ",v1,...,vn\n" for {@code n} values from {@code off}. */
    private static void csvRow(Writer w, double[] v, int off, int n) throws IOException {
        for (int c = 0; c < n; c++) w.append(',').write(NumberOutput.toString(v[off + c], true));
        w.write('\n');
    }

    private static void omittedHeader(Context ctx, List<String> omitted) {
        if (!omitted.isEmpty()) ResponseSender.listHeader(ctx, "X-Omitted", omitted);
    }

    private static List<String> factorColumns(int k) {
        List<String> c = new ArrayList<>(k);
        for (int j = 1; j <= k; j++) c.add("f" + j);
        return c;
    }
}
