package eigencov.http;

import com.fasterxml.jackson.core.JsonProcessingException;
import com.fasterxml.jackson.databind.exc.UnrecognizedPropertyException;

import java.util.List;
import java.util.Map;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

/**
 * Jackson's message about a request body, in the API's terms: the JSON kind that was expected and
 * the kind found, never a Java class name (a client cannot act on {@code eigencov.http.QueryRoutes$RiskBody}
 * or {@code java.lang.Integer}).
 */
final class JsonErrors {
    /** Jackson's notes for Java programmers: " (class x.y.Z)", " (but could if coercion was enabled ...)". */
    private static final Pattern NOTES = Pattern.compile(" \\(class [^)]*\\)| \\(but could if coercion[^)]*\\)");
    /** "Cannot deserialize value of type `T` from Array value (token `JsonToken.START_ARRAY`)". */
    private static final Pattern WRONG_KIND = Pattern.compile(
            "^Cannot deserialize value of type `([^`]+)` from .*?\\(token `([^`]+)`\\)");
    /** "Cannot coerce Floating-point value (2.5) to `java.lang.Integer` value". */
    private static final Pattern COERCE = Pattern.compile("^Cannot coerce .*?\\((.*)\\) to `([^`]+)` value");
    /** A type in backquotes: `java.lang.Integer`, `eigencov.http.QueryRoutes$RiskBody`, `JsonToken.START_ARRAY`. */
    private static final Pattern QUOTED = Pattern.compile("`([A-Za-z0-9_.$\\[\\];<>, ]+)`");
    private static final Map<String, String> KINDS = Map.ofEntries(
            Map.entry("java.lang.Double", "a number"), Map.entry("double", "a number"),
            Map.entry("java.lang.Float", "a number"), Map.entry("java.math.BigDecimal", "a number"),
            Map.entry("java.lang.Integer", "a whole number"), Map.entry("int", "a whole number"),
            Map.entry("java.lang.Long", "a whole number"), Map.entry("long", "a whole number"),
            Map.entry("java.lang.Boolean", "true or false"), Map.entry("boolean", "true or false"),
            Map.entry("java.lang.String", "a string"), Map.entry("java.time.LocalDate", "a date (YYYY-MM-DD)"),
            Map.entry("JsonToken.START_ARRAY", "an array"), Map.entry("JsonToken.START_OBJECT", "an object"),
            Map.entry("JsonToken.VALUE_STRING", "a string"), Map.entry("JsonToken.VALUE_NUMBER_INT", "a number"),
            Map.entry("JsonToken.VALUE_NUMBER_FLOAT", "a number"), Map.entry("JsonToken.VALUE_TRUE", "true"),
            Map.entry("JsonToken.VALUE_FALSE", "false"), Map.entry("JsonToken.VALUE_NULL", "null"));

    private JsonErrors() {
    }

    static String describe(JsonProcessingException e) {
        if (e instanceof UnrecognizedPropertyException u) {
            List<String> known = u.getKnownPropertyIds() == null ? List.of()
                    : u.getKnownPropertyIds().stream().map(String::valueOf).sorted().toList();
            return "unknown field '" + u.getPropertyName() + "'" + (known.isEmpty() ? "" : "; the fields are " + String.join(", ", known));
        }
        String m = NOTES.matcher(e.getOriginalMessage()).replaceAll("");
        Matcher w = WRONG_KIND.matcher(m);
        if (w.find()) return "expected " + kind(w.group(1)) + ", found " + kind(w.group(2));
        Matcher c = COERCE.matcher(m);
        if (c.find()) return "expected " + kind(c.group(2)) + ", found " + c.group(1);
        Matcher q = QUOTED.matcher(m);
        return q.replaceAll(r -> Matcher.quoteReplacement(kind(r.group(1))));
    }

    /** The JSON kind of a Java type named in a message. */
    private static String kind(String type) {
        String k = KINDS.get(type);
        if (k != null) return k;
        if (type.startsWith("java.util.List") || type.startsWith("java.util.ArrayList") || type.endsWith("[]")) return "an array";
        if (type.startsWith("java.util.Map") || type.startsWith("eigencov.")) return "an object";
        return type.substring(type.lastIndexOf('.') + 1);
    }
}
