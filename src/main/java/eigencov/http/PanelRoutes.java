package eigencov.http;

import com.fasterxml.jackson.core.JsonFactory;
import com.fasterxml.jackson.core.JsonGenerator;
import eigencov.service.IngestResult;
import eigencov.service.PanelService;
import eigencov.service.ReturnsFormat;
import eigencov.store.ReturnSink;
import io.javalin.config.RoutesConfig;
import io.javalin.http.Context;

import java.io.BufferedOutputStream;
import java.io.IOException;
import java.io.OutputStream;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.time.LocalDate;
import java.time.format.DateTimeParseException;
import java.util.List;
import java.util.Map;

/**
 * Panels and returns: upload ({@code POST /v1/panels/{panel}/returns}, JSON or CSV, streamed),
 * read-back ({@code GET .../returns}, JSON or CSV, streamed), and panel summaries.
 */
public final class PanelRoutes implements RouteModule {
    private final PanelService panels;
    private final long maxBodyBytes;
    private final JsonFactory json;

    /**
     * @param maxBodyBytes largest upload accepted (413 above), counted on the streamed body
     * @param json         factory for streamed JSON responses (the process's ObjectMapper factory)
     */
    public PanelRoutes(PanelService panels, long maxBodyBytes, JsonFactory json) {
        this.panels = panels;
        this.maxBodyBytes = maxBodyBytes;
        this.json = json;
    }

    @Override
    public void register(RoutesConfig routes) {
        routes.post("/v1/panels/{panel}/returns", this::ingest);
        routes.get("/v1/panels/{panel}/returns", this::readReturns);
        routes.get("/v1/panels", ctx -> ctx.json(Map.of("panels", panels.panels())));
        routes.get("/v1/panels/{panel}", ctx -> ctx.json(panels.panel(ctx.pathParam("panel"))));
    }

    private void ingest(Context ctx) {
        ReturnsFormat format = ReturnsFormat.ofContentType(ctx.header("Content-Type")).orElseThrow(() -> new ApiException(415,
                "unsupported-media-type", "Unsupported media type",
                "send returns as application/json or text/csv, not " + (ctx.header("Content-Type") == null ? "a body without Content-Type" : ctx.header("Content-Type")),
                List.of(FieldError.field("Content-Type", "must be application/json or text/csv"))));
        long declared = ctx.req().getContentLengthLong();
        if (declared > maxBodyBytes) throw LimitedBody.tooLarge(maxBodyBytes);
        IngestResult result = panels.ingest(ctx.pathParam("panel"), format, new LimitedBody(ctx.bodyInputStream(), maxBodyBytes));
        ctx.json(result);
    }

    private void readReturns(Context ctx) {
        LocalDate from = dateParam(ctx, "from");
        LocalDate to = dateParam(ctx, "to");
        String accept = ctx.header("Accept");
        boolean csv = accept != null && accept.toLowerCase().contains("text/csv");
        String panel = ctx.pathParam("panel");
        try (ReturnsWriter out = csv ? new CsvWriter(ctx) : new JsonWriter(ctx, json, panel)) {
            panels.readReturns(panel, ctx.queryParam("tickers"), from, to, out);
            out.finish();
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    private static LocalDate dateParam(Context ctx, String name) {
        String v = ctx.queryParam(name);
        if (v == null || v.isBlank()) return null;
        try {
            return LocalDate.parse(v.strip());
        } catch (DateTimeParseException e) {
            throw ApiException.badField(name, "must be a date YYYY-MM-DD, was '" + v + "'");
        }
    }

    /**
     * A streamed read-back body. Nothing is written until the first row or {@link #finish}, so a
     * 404 or 400 found before then still becomes a problem response.
     */
    private abstract static class ReturnsWriter implements ReturnSink, AutoCloseable {
        private final Context ctx;
        private final String contentType;
        private boolean started;

        ReturnsWriter(Context ctx, String contentType) {
            this.ctx = ctx;
            this.contentType = contentType;
        }

        @Override
        public final void accept(LocalDate date, String ticker, double value) throws IOException {
            if (!started) begin();
            row(date, ticker, value);
        }

        final void finish() throws IOException {
            if (!started) begin();
            end();
        }

        private void begin() throws IOException {
            started = true;
            ctx.status(200);
            ctx.contentType(contentType);
            open(new BufferedOutputStream(ctx.outputStream(), 64 * 1024));
        }

        abstract void open(OutputStream out) throws IOException;

        abstract void row(LocalDate date, String ticker, double value) throws IOException;

        abstract void end() throws IOException;

        @Override
        public abstract void close() throws IOException;
    }

    private static final class CsvWriter extends ReturnsWriter {
        private OutputStream out;

        CsvWriter(Context ctx) {
            super(ctx, "text/csv; charset=utf-8");
        }

        @Override
        void open(OutputStream o) throws IOException {
            out = o;
            out.write("date,ticker,value\n".getBytes(StandardCharsets.US_ASCII));
        }

        @Override
        void row(LocalDate date, String ticker, double value) throws IOException {
            // Tickers are [A-Za-z0-9._:/-] only, so no field ever needs quoting.
            out.write((date + "," + ticker + "," + value + "\n").getBytes(StandardCharsets.US_ASCII));
        }

        @Override
        void end() throws IOException {
            out.flush();
        }

        @Override
        public void close() throws IOException {
            if (out != null) out.close();
        }
    }

    private static final class JsonWriter extends ReturnsWriter {
        private final JsonFactory factory;
        private final String panel;
        private JsonGenerator g;

        JsonWriter(Context ctx, JsonFactory factory, String panel) {
            super(ctx, "application/json");
            this.factory = factory;
            this.panel = panel;
        }

        @Override
        void open(OutputStream out) throws IOException {
            g = factory.createGenerator(out);
            g.writeStartObject();
            g.writeStringField("panel", panel);
            g.writeArrayFieldStart("returns");
        }

        @Override
        void row(LocalDate date, String ticker, double value) throws IOException {
            g.writeStartObject();
            g.writeStringField("date", date.toString());
            g.writeStringField("ticker", ticker);
            g.writeNumberField("value", value);
            g.writeEndObject();
        }

        @Override
        void end() throws IOException {
            g.writeEndArray();
            g.writeEndObject();
            g.flush();
        }

        @Override
        public void close() throws IOException {
            if (g != null) g.close();
        }
    }
}
