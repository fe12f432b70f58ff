package eigencov.http;

import com.fasterxml.jackson.core.io.NumberOutput;
import eigencov.math.ActiveRisk;
import eigencov.math.PortfolioRisk;
import eigencov.service.CovarianceMatrix;
import eigencov.service.FactorForm;
import eigencov.service.FactorReturnSeries;
import eigencov.service.FactorSpectrum;
import eigencov.service.FitRef;
import eigencov.service.MatrixAnswer;
import eigencov.service.MinimumVarianceAnswer;
import eigencov.service.PrecisionMatrix;
import eigencov.service.RiskAnswer;
import eigencov.service.Scale;
import io.javalin.http.Context;

import java.io.BufferedWriter;
import java.io.IOException;
import java.io.OutputStream;
import java.io.OutputStreamWriter;
import java.io.Writer;
import java.nio.DoubleBuffer;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.List;

/**
 * Writes query answers as JSON, CSV or {@code .npy}. JSON is streamed with {@link JsonOut} (the
 * bytes Jackson's generator with the fast double writer would give, at a fraction of its cost)
 * straight to the response, with no intermediate tree; CSV numbers use Jackson's shortest-repr
 * writer, the same digits; {@code .npy} is streamed through a small buffer (see {@link Npy}).
 *
 * <p>Formats: JSON matrices are arrays of rows. CSV has a header row; a covariance matrix's first
 * column is the ticker. {@code .npy} rows follow the answered tickers (or dates), listed in the
 * {@code X-Tickers} (or {@code X-Dates}) header; requested tickers left out under missing=omit are
 * in {@code X-Omitted} for CSV and {@code .npy}, and in {@code "omitted"} for JSON; answered tickers
 * that are short-history names of the fit likewise in {@code X-Short-History} and {@code "shortHistory"}.
 */
final class QueryResponses {
    /** A portfolio's per-asset rows; an asset's beta to the first factor is a property of the fit, so it recurs. */
    private static final JsonOut.RowShape ASSET_ROW = new JsonOut.RowShape("ticker",
            "weight", "marginal", "contribution", "specificContribution", "beta").recurring("beta");
    /** Per-asset rows of the active (tracking error) decomposition. */
    private static final JsonOut.RowShape ACTIVE_ROW = new JsonOut.RowShape("ticker",
            "activeWeight", "marginal", "contribution", "specificContribution");

    /** Rough JSON size of one double (digits, exponent, separator), for the compression decision. */
    private static final int BYTES_PER_NUMBER = 22;

    void covarianceMatrix(Context ctx, Representation rep, CovarianceMatrix a, byte[] key) {
        squareMatrix(ctx, rep, key, a, g -> {
            g.string("form", "matrix");
            writeScale(g, a.scale());
            g.bool("correlation", a.correlation());
        });
    }

    /** The inverse: as a covariance matrix, without form and correlation. */
    void precision(Context ctx, Representation rep, PrecisionMatrix a, byte[] key) {
        squareMatrix(ctx, rep, key, a, g -> writeScale(g, a.scale()));
    }

    /**
     * An n x n matrix over the answered tickers: JSON {@code head}, tickers, omitted, shortHistory and the
     * rows; CSV with a ticker column; {@code .npy} with the order in {@code X-Tickers}.
     */
    private static void squareMatrix(Context ctx, Representation rep, byte[] key, MatrixAnswer a, JsonFields head) {
        List<String> tickers = a.tickers();
        int n = tickers.size();
        DoubleBuffer m = a.matrixView();
        long size = (long) n * n * BYTES_PER_NUMBER;
        switch (rep) {
            case JSON -> json(ctx, a.fit(), key, size, g -> {
                head.write(g);
                g.strings("tickers", tickers);
                g.strings("omitted", a.omitted());
                g.strings("shortHistory", a.shortHistory());
                g.symmetricRows("matrix", m, n);
            });
            case CSV -> {
                listHeaders(ctx, a.omitted(), a.shortHistory());
                csv(ctx, a.fit(), key, size, w -> {
                    w.write("ticker");
                    for (String t : tickers) w.append(',').write(t);
                    w.write('\n');
                    double[] row = new double[n];
                    for (int r = 0; r < n; r++) {
                        m.get(r * n, row, 0, n);
                        w.write(tickers.get(r));
                        csvRow(w, row, 0, n);
                    }
                });
            }
            case NPY -> {
                ResponseSender.listHeader(ctx, "X-Tickers", tickers);
                listHeaders(ctx, a.omitted(), a.shortHistory());
                ResponseSender.sendBinary(ctx, a.fit(), rep, key, Npy.length(n, n), out -> Npy.write(out, n, n, m));
            }
        }
    }

    void factorForm(Context ctx, FactorForm a, byte[] key) {
        int n = a.tickers().size();
        int k = a.factors();
        json(ctx, a.fit(), key, (long) n * (k + 1) * BYTES_PER_NUMBER, g -> {
            g.string("form", "factor");
            writeScale(g, a.scale());
            g.number("factors", k);
            g.strings("tickers", a.tickers());
            g.strings("omitted", a.omitted());
            g.strings("shortHistory", a.shortHistory());
            g.rows("exposures", a.exposures(), n, k);
            g.rows("factorCovariance", a.factorCovariance(), k, k);
            g.numbers("specificVariance", a.specificVariance());
        });
    }

    /**
     * Exposures: JSON {@code exposures} (n x k), {@code specificVariance} and {@code beta} (to the first
     * factor); CSV columns {@code ticker,f1..fk,specificVariance}; {@code .npy} an n x (k+1) matrix whose last
     * column is the specific variance (columns named in {@code X-Columns}).
     */
    void exposures(Context ctx, Representation rep, FactorForm a, byte[] key) {
        int n = a.tickers().size();
        int k = a.factors();
        long size = (long) n * (k + 1) * BYTES_PER_NUMBER;
        double[] b = a.exposures();
        double[] d = a.specificVariance();
        switch (rep) {
            case JSON -> json(ctx, a.fit(), key, size, g -> {
                g.number("factors", k);
                g.strings("tickers", a.tickers());
                g.strings("omitted", a.omitted());
                g.strings("shortHistory", a.shortHistory());
                g.rows("exposures", b, n, k);
                g.numbers("specificVariance", d);
                g.numbers("beta", a.betas());
            });
            case CSV -> {
                listHeaders(ctx, a.omitted(), a.shortHistory());
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
                listHeaders(ctx, a.omitted(), a.shortHistory());
                ResponseSender.sendBinary(ctx, a.fit(), rep, key, Npy.length(n, k + 1), o -> Npy.write(o, n, k + 1, out));
            }
        }
    }

    void factors(Context ctx, FactorSpectrum a, byte[] key) {
        int k = a.factors();
        json(ctx, a.fit(), key, (long) (k * k + 2 * a.eigenvalues().length) * BYTES_PER_NUMBER, g -> {
            g.number("factors", k);
            g.rows("factorCovariance", a.factorCovariance(), k, k);
            g.numbers("eigenvalues", a.eigenvalues());
            g.numbers("varianceShare", a.varianceShare());
            g.number("explainedShare", a.explainedShare());
        });
    }

    /** Factor returns: JSON {@code dates} and {@code factorReturns} (dates x k); CSV {@code date,f1..fk}; {@code .npy} dates x k with {@code X-Dates}. */
    void factorReturns(Context ctx, Representation rep, FactorReturnSeries a, byte[] key) {
        int t = a.dates().size();
        int k = a.factors();
        double[] v = a.values();
        long size = (long) t * k * BYTES_PER_NUMBER;
        switch (rep) {
            case JSON -> json(ctx, a.fit(), key, size, g -> {
                g.number("factors", k);
                g.startArray("dates");
                for (var d : a.dates()) g.string(d.toString());
                g.endArray();
                g.rows("factorReturns", v, t, k);
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
                ResponseSender.sendBinary(ctx, a.fit(), rep, key, Npy.length(t, k), out -> Npy.write(out, t, k, v));
            }
        }
    }

    void risk(Context ctx, RiskAnswer a, byte[] key) {
        PortfolioRisk r = a.risk();
        int n = a.tickers().size();
        json(ctx, a.fit(), key, (long) n * 6 * BYTES_PER_NUMBER, g -> {
            writeScale(g, a.scale());
            g.number("volatility", r.volatility());
            g.number("variance", r.variance());
            g.number("factorVariance", r.factorVariance());
            g.number("specificVariance", r.specificVariance());
            if (r.trackingError() != null) g.number("trackingError", r.trackingError());
            g.number("beta", r.beta());
            byFactor(g, r.factorExposures(), r.factorContributions());
            double[] specific = r.specificContributions();
            g.number("specificContribution", sum(specific));
            g.shapedRows("byAsset", ASSET_ROW, a.tickers(), a.weights(), r.marginal(), r.contribution(), specific,
                    r.assetBetas());
            if (r.active() != null) active(g, r.active(), a.activeTickers());
            g.strings("omitted", a.omitted());
            g.strings("shortHistory", a.shortHistory());
        });
    }

    /** Minimum-variance weights as an object {ticker: weight} in answer order, their budget and volatility. */
    void minimumVariance(Context ctx, MinimumVarianceAnswer a, byte[] key) {
        double[] w = a.weights();
        List<String> tickers = a.tickers();
        json(ctx, a.fit(), key, (long) tickers.size() * (BYTES_PER_NUMBER + 12), g -> {
            writeScale(g, a.scale());
            g.strings("tickers", tickers);
            g.strings("omitted", a.omitted());
            g.strings("shortHistory", a.shortHistory());
            g.startObject("weights");
            for (int i = 0; i < w.length; i++) g.number(tickers.get(i), w[i]);
            g.endObject();
            g.number("budget", a.budget());
            g.number("volatility", a.volatility());
        });
    }

    /** Tracking error decomposed over the union of portfolio and benchmark names (active weights a = w - benchmark). */
    private static void active(JsonOut g, ActiveRisk act, List<String> tickers) throws IOException {
        g.startObject("active");
        g.number("trackingError", act.trackingError());
        g.number("variance", act.variance());
        byFactor(g, act.factorExposures(), act.factorContributions());
        double[] specific = act.specificContributions();
        g.number("specificContribution", sum(specific));
        g.shapedRows("byAsset", ACTIVE_ROW, tickers, act.activeWeights(), act.marginal(), act.contribution(), specific);
        g.endObject();
    }

    /** "byFactor": [{factor (1-based), exposure, contribution}]. */
    private static void byFactor(JsonOut g, double[] exposure, double[] contribution) throws IOException {
        g.startArray("byFactor");
        for (int j = 0; j < exposure.length; j++) {
            g.startObject();
            g.number("factor", j + 1);
            g.number("exposure", exposure[j]);
            g.number("contribution", contribution[j]);
            g.endObject();
        }
        g.endArray();
    }

    private static double sum(double[] v) {
        double s = 0;
        for (double x : v) s += x;
        return s;
    }

    // ---- JSON ----

    private interface JsonFields {
        void write(JsonOut g) throws IOException;
    }

    /** An object holding "fit", "caution", then {@code fields}. */
    private static void json(Context ctx, FitRef fit, byte[] key, long approxBytes, JsonFields fields) {
        ResponseSender.send(ctx, fit, Representation.JSON, key, approxBytes, true, out -> {
            try (JsonOut g = new JsonOut(out, approxBytes > ResponseSender.WHOLE_BODY_BYTES ? JsonOut.LARGE_BUFFER_BYTES : JsonOut.BUFFER_BYTES)) {
                g.startObject();
                g.startObject("fit");
                g.number("id", fit.id());
                g.string("model", fit.model());
                g.string("asOf", fit.asOf().toString());
                g.string("createdAt", fit.createdAt().toString());
                g.endObject();
                g.string("caution", ResponseSender.CAUTION);
                fields.write(g);
                g.endObject();
            }
        });
    }

    private static void writeScale(JsonOut g, Scale s) throws IOException {
        g.startObject("scale");
        g.string("name", s.name());
        g.number("days", s.days());
        g.endObject();
    }

    // ---- CSV ----

    private interface CsvBody {
        void write(Writer w) throws IOException;
    }

    private static void csv(Context ctx, FitRef fit, byte[] key, long approxBytes, CsvBody body) {
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

    /** {@code X-Omitted} and {@code X-Short-History}, each when not empty. */
    private static void listHeaders(Context ctx, List<String> omitted, List<String> shortHistory) {
        if (!omitted.isEmpty()) ResponseSender.listHeader(ctx, "X-Omitted", omitted);
        if (!shortHistory.isEmpty()) ResponseSender.listHeader(ctx, "X-Short-History", shortHistory);
    }

    private static List<String> factorColumns(int k) {
        List<String> c = new ArrayList<>(k);
        for (int j = 1; j <= k; j++) c.add("f" + j);
        return c;
    }
}
