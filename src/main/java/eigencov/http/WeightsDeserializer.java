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
 * A repeated ticker is caught by the parser (the query readers enable strict duplicate detection).
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
        String[] tickers = new String[256];
        double[] values = new double[256];
        int n = 0;
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
            if (n == tickers.length) {
                tickers = Arrays.copyOf(tickers, 2 * n);
                values = Arrays.copyOf(values, 2 * n);
            }
            tickers[n] = name;
            values[n++] = w;
        }
        return new Weights(tickers, values, n);
    }
}
