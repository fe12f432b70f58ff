package eigencov.http;

import com.fasterxml.jackson.core.JsonParser;
import com.fasterxml.jackson.core.JsonToken;
import com.fasterxml.jackson.databind.DeserializationContext;
import com.fasterxml.jackson.databind.JsonMappingException;
import com.fasterxml.jackson.databind.deser.std.StdDeserializer;
import eigencov.service.Weights;

import java.io.IOException;
import java.util.Arrays;

/**
 * Reads a JSON object of ticker to weight ({@code {"AAA": 0.25, ...}}) straight into {@link Weights}:
 * names and numbers land in two arrays in request order, with no map node or boxed double per name.
 * A repeated ticker is refused by {@link eigencov.service.RiskQuery} (the risk body is read without the
 * parser's duplicate detection, see {@link RiskBodyDeserializer}).
 * Number tokens are read directly; anything else (a quoted number, "NaN", a string, an array) goes
 * through Jackson's own {@code Double} rules, so what is accepted and the error named
 * {@code weights.TICKER} stay those of a {@code Map<String, Double>}. A null weight is kept as NaN
 * and refused by {@link eigencov.service.RiskQuery} with the other non-finite weights.
 */
final class WeightsDeserializer extends StdDeserializer<Weights> {
    WeightsDeserializer() {
        super(Weights.class);
    }

    @Override
    public Weights deserialize(JsonParser p, DeserializationContext ctxt) throws IOException {
        if (!p.isExpectedStartObjectToken()) return (Weights) ctxt.handleUnexpectedToken(Weights.class, p);
        Scratch scratch = SCRATCH.get();
        try {
            return read(p, ctxt, scratch);
        } finally {
            scratch.clear();
        }
    }

    private static Weights read(JsonParser p, DeserializationContext ctxt, Scratch scratch) throws IOException {
        for (String name = p.nextFieldName(); name != null; name = p.nextFieldName()) {
            JsonToken t = p.nextToken();
            double w;
            if (t == JsonToken.VALUE_NUMBER_FLOAT || t == JsonToken.VALUE_NUMBER_INT) {
                w = p.getDoubleValue();
            } else if (t == JsonToken.VALUE_NULL) {
                w = Double.NaN;
            } else {
                try {
                    Double d = ctxt.readValue(p, Double.class);
                    w = d == null ? Double.NaN : d;
                } catch (JsonMappingException e) {
                    throw JsonMappingException.wrapWithPath(e, (Object) null, name);
                }
            }
            scratch.add(name, w);
        }
        return new Weights(scratch.tickers, scratch.values, scratch.n);
    }

    /**
     * Growing arrays kept per thread between requests (Jetty's threads are pooled): growing fresh
     * ones for each 3,000-name portfolio was most of what reading it allocated. Weights copies out
     * of them; the names are cleared afterwards, and arrays grown past {@link #MAX_KEPT} are dropped.
     */
    private static final ThreadLocal<Scratch> SCRATCH = ThreadLocal.withInitial(Scratch::new);

    private static final class Scratch {
        static final int INITIAL = 256;
        static final int MAX_KEPT = 1 << 16;
        String[] tickers = new String[INITIAL];
        double[] values = new double[INITIAL];
        int n;

        void add(String ticker, double weight) {
            if (n == tickers.length) {
                tickers = Arrays.copyOf(tickers, 2 * n);
                values = Arrays.copyOf(values, 2 * n);
            }
            tickers[n] = ticker;
            values[n++] = weight;
        }

        void clear() {
            Arrays.fill(tickers, 0, n, null);
            n = 0;
            if (tickers.length > MAX_KEPT) {
                tickers = new String[INITIAL];
                values = new double[INITIAL];
            }
        }
    }
}
