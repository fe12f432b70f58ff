package eigencov.service;

import com.fasterxml.jackson.core.JsonFactory;
import com.fasterxml.jackson.core.JsonParser;
import com.fasterxml.jackson.core.JsonProcessingException;
import com.fasterxml.jackson.core.JsonToken;
import com.fasterxml.jackson.core.StreamReadFeature;

import java.io.IOException;
import java.io.InputStream;

/**
 * Streams a JSON returns body {@code {"returns": [{"date", "ticker", "value"}, ...]}} token by token
 * into a {@link ReturnBatchBuilder}; rows are numbered by their 1-based position in the array.
 * Unknown fields are errors; a syntax error stops the reading with its line and column.
 */
final class JsonReturnsReader {
    private static final JsonFactory FACTORY = JsonFactory.builder()
            .enable(StreamReadFeature.USE_FAST_DOUBLE_PARSER)
            .enable(StreamReadFeature.INCLUDE_SOURCE_IN_LOCATION)
            .enable(StreamReadFeature.STRICT_DUPLICATE_DETECTION)
            .build();

    private JsonReturnsReader() {
    }

    static void read(InputStream body, ReturnBatchBuilder out) throws IOException {
        try (JsonParser p = FACTORY.createParser(body)) {
            try {
                readBody(p, out);
            } catch (JsonProcessingException e) {
                // Locate the failure: the array position being read and the field name the parser last saw.
                var ctx = p.getParsingContext();
                String field = ctx.inObject() ? ctx.getCurrentName() : null;
                long row = 0;
                for (var c = ctx; c != null; c = c.getParent()) {
                    if (c.inArray() && c.getParent() != null && "returns".equals(c.getParent().getCurrentName())) row = c.getCurrentIndex() + 1L;
                }
                var loc = e.getLocation();
                String at = loc == null ? "" : " (line " + loc.getLineNr() + ", column " + loc.getColumnNr() + ")";
                out.issue(row > 0 ? row : null, row > 0 && field != null ? field : "body", "malformed JSON: " + e.getOriginalMessage() + at);
            }
        }
    }

    private static void readBody(JsonParser p, ReturnBatchBuilder out) throws IOException {
        long row = 0;
        if (p.nextToken() != JsonToken.START_OBJECT) {
            out.issue(null, "body", "expected a JSON object {\"returns\": [...]}");
            return;
        }
        boolean sawReturns = false;
        while (p.nextToken() == JsonToken.FIELD_NAME) {
            String top = p.currentName();
            JsonToken t = p.nextToken();
            if (!top.equals("returns")) {
                out.issue(null, top, "unknown field; the body holds only \"returns\"");
                p.skipChildren();
                continue;
            }
            sawReturns = true;
            if (t != JsonToken.START_ARRAY) {
                out.issue(null, "returns", "must be an array of {\"date\", \"ticker\", \"value\"} objects");
                p.skipChildren();
                continue;
            }
            while ((t = p.nextToken()) != JsonToken.END_ARRAY) {
                row++;
                out.beginRow(row);
                if (t != JsonToken.START_OBJECT) {
                    out.invalidRow(null, "must be an object {\"date\", \"ticker\", \"value\"}");
                    p.skipChildren();
                    out.endRow();
                    continue;
                }
                while (p.nextToken() == JsonToken.FIELD_NAME) {
                    String field = p.currentName();
                    readField(p, p.nextToken(), field, out);
                }
                out.endRow();
            }
        }
        if (!sawReturns) out.issue(null, "returns", "missing");
        if (p.nextToken() != null) out.issue(null, "body", "unexpected content after the JSON object");
    }

    private static void readField(JsonParser p, JsonToken t, String field, ReturnBatchBuilder out) throws IOException {
        switch (field) {
            case "date", "ticker" -> {
                if (t != JsonToken.VALUE_STRING) {
                    out.invalid(field, "must be a string, was " + describe(t));
                    p.skipChildren();
                } else if (field.equals("date")) {
                    out.date(p.getText());
                } else {
                    out.ticker(p.getText());
                }
            }
            case "value" -> {
                if (t == JsonToken.VALUE_NUMBER_FLOAT || t == JsonToken.VALUE_NUMBER_INT) {
                    out.value(p.getDoubleValue());
                } else {
                    out.invalid(field, "must be a number, was " + describe(t));
                    p.skipChildren();
                }
            }
            default -> {
                out.invalid(field, "unknown field; a row holds date, ticker and value");
                p.skipChildren();
            }
        }
    }

    private static String describe(JsonToken t) {
        return switch (t) {
            case VALUE_NULL -> "null";
            case VALUE_STRING -> "a string";
            case VALUE_TRUE, VALUE_FALSE -> "a boolean";
            case START_ARRAY -> "an array";
            case START_OBJECT -> "an object";
            default -> "a number";
        };
    }
}
