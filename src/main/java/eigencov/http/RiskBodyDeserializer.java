package eigencov.http;

import com.fasterxml.jackson.core.JsonParser;
import com.fasterxml.jackson.core.JsonToken;
import com.fasterxml.jackson.databind.DeserializationContext;
import com.fasterxml.jackson.databind.JsonMappingException;
import com.fasterxml.jackson.databind.deser.std.StdDeserializer;
import com.fasterxml.jackson.databind.exc.MismatchedInputException;
import eigencov.service.Weights;

import java.io.IOException;

/**
 * Reads the body of {@code POST /risk} field by field. It exists so that the risk body can be
 * read without the parser's duplicate detection, which keeps a hash set entry for every key of
 * every object: for a 3,000-name portfolio that was a sixth of the garbage of a request. Repeated
 * top-level fields are refused here instead; repeated tickers by
 * {@link eigencov.service.RiskQuery}. Field values go through Jackson's own rules (the reader's
 * features apply: no fraction for {@code horizonDays}, unknown fields refused), and every error
 * names its field.
 */
final class RiskBodyDeserializer extends StdDeserializer<QueryRoutes.RiskBody> {
    private final WeightsDeserializer weights = new WeightsDeserializer();

    RiskBodyDeserializer() {
        super(QueryRoutes.RiskBody.class);
    }

    /** Named in the problem of an unknown field. */
    @Override
    public java.util.Collection<Object> getKnownPropertyNames() {
        return java.util.List.of("weights", "benchmark", "scale", "horizonDays");
    }

    @Override
    public QueryRoutes.RiskBody deserialize(JsonParser p, DeserializationContext ctxt) throws IOException {
        if (!p.isExpectedStartObjectToken()) return (QueryRoutes.RiskBody) ctxt.handleUnexpectedToken(QueryRoutes.RiskBody.class, p);
        Weights w = null;
        Weights benchmark = null;
        String scale = null;
        Integer horizonDays = null;
        int seen = 0;
        for (String name = p.nextFieldName(); name != null; name = p.nextFieldName()) {
            JsonToken t = p.nextToken();
            int bit = switch (name) {
                case "weights" -> 1;
                case "benchmark" -> 2;
                case "scale" -> 4;
                case "horizonDays" -> 8;
                default -> 0;
            };
            if (bit == 0) {
                ctxt.handleUnknownProperty(p, this, QueryRoutes.RiskBody.class, name);
                continue;
            }
            if ((seen & bit) != 0) {
                throw JsonMappingException.wrapWithPath(MismatchedInputException.from(p, QueryRoutes.RiskBody.class,
                        "Duplicate field '" + name + "'"), (Object) null, name);
            }
            seen |= bit;
            try {
                switch (bit) {
                    case 1 -> w = t == JsonToken.VALUE_NULL ? null : weights.deserialize(p, ctxt);
                    case 2 -> benchmark = t == JsonToken.VALUE_NULL ? null : weights.deserialize(p, ctxt);
                    case 4 -> scale = ctxt.readValue(p, String.class);
                    default -> horizonDays = ctxt.readValue(p, Integer.class);
                }
            } catch (JsonMappingException e) {
                throw JsonMappingException.wrapWithPath(e, (Object) null, name);
            }
        }
        return new QueryRoutes.RiskBody(w, benchmark, scale, horizonDays);
    }
}
