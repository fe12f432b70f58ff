package eigencov.http;

import eigencov.service.FitSelector;
import eigencov.service.MissingTickers;
import eigencov.service.Scale;

import java.time.LocalDate;
import java.time.format.DateTimeParseException;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.TreeSet;

/**
 * The query-string parameters of one request, parsed strictly: unknown names, repeated single
 * values and unparsable values are 400 problems naming the parameter.
 */
final class QueryParams {
    /** Fit selection and missing-ticker policy, taken by every query endpoint. */
    static final Set<String> SELECTION = Set.of("asOf", "fit", "missing");

    private final Map<String, List<String>> values;

    private QueryParams(Map<String, List<String>> values) {
        this.values = values;
    }

    static QueryParams of(Map<String, List<String>> values, Set<String> allowed) {
        Set<String> unknown = new TreeSet<>(values.keySet());
        unknown.removeAll(allowed);
        if (!unknown.isEmpty()) {
            List<FieldError> errors = unknown.stream().map(n -> FieldError.field(n, "unknown query parameter (known: "
                    + String.join(", ", new TreeSet<>(allowed)) + ")")).toList();
            throw ApiException.badRequest("unknown query parameter" + (unknown.size() > 1 ? "s " : " ") + String.join(", ", unknown), errors);
        }
        return new QueryParams(values);
    }

    /** The single value of {@code name}, or null when absent. */
    String single(String name) {
        List<String> v = values.get(name);
        if (v == null || v.isEmpty()) return null;
        if (v.size() > 1) throw ApiException.badField(name, "given " + v.size() + " times; give it once");
        return v.get(0);
    }

    LocalDate date(String name) {
        String s = single(name);
        if (s == null) return null;
        try {
            return LocalDate.parse(s);
        } catch (DateTimeParseException e) {
            throw ApiException.badField(name, "must be a date YYYY-MM-DD, was '" + s + "'");
        }
    }

    Integer integer(String name) {
        String s = single(name);
        if (s == null) return null;
        try {
            return Integer.valueOf(s);
        } catch (NumberFormatException e) {
            throw ApiException.badField(name, "must be a whole number, was '" + s + "'");
        }
    }

    boolean bool(String name) {
        String s = single(name);
        if (s == null || s.equals("false")) return false;
        if (s.equals("true")) return true;
        throw ApiException.badField(name, "must be true or false, was '" + s + "'");
    }

    /** Comma-separated tickers, also accepted as repeated parameters; null when absent. */
    List<String> list(String name) {
        List<String> v = values.get(name);
        if (v == null) return null;
        List<String> out = new ArrayList<>();
        for (String s : v) {
            if (s.isEmpty()) continue;
            for (String t : s.split(",", -1)) out.add(t.trim());
        }
        return out;
    }

    FitSelector selector() {
        LocalDate asOf = date("asOf");
        String fit = single("fit");
        Long fitId = null;
        if (fit != null) {
            try {
                fitId = Long.valueOf(fit);
            } catch (NumberFormatException e) {
                throw ApiException.badField("fit", "must be a fit id (whole number), was '" + fit + "'");
            }
            if (fitId < 1) throw ApiException.badField("fit", "must be a positive fit id, was " + fitId);
        }
        return new FitSelector(asOf, fitId);
    }

    MissingTickers missing() {
        return choice("missing", single("missing"), Map.of("error", MissingTickers.ERROR, "omit", MissingTickers.OMIT), MissingTickers.ERROR);
    }

    /** {@code value} looked up in {@code choices}; null gives {@code fallback}; anything else is a 400 naming {@code field}. */
    static <E> E choice(String field, String value, Map<String, E> choices, E fallback) {
        if (value == null) return fallback;
        E e = choices.get(value);
        if (e == null) throw ApiException.badField(field, "must be one of " + String.join(", ", new TreeSet<>(choices.keySet())) + ", was '" + value + "'");
        return e;
    }

    /** {@code scale} (daily, annual) or {@code horizonDays}, not both; default daily. */
    static Scale scale(String scale, Integer horizonDays) {
        if (scale != null && horizonDays != null) {
            throw ApiException.badRequest("give scale or horizonDays, not both", List.of(
                    FieldError.field("scale", "cannot be combined with horizonDays"),
                    FieldError.field("horizonDays", "cannot be combined with scale")));
        }
        if (horizonDays != null) return Scale.horizon(horizonDays);
        return choice("scale", scale, Map.of("daily", Scale.daily(), "annual", Scale.annual()), Scale.daily());
    }
}
