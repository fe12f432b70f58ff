package eigencov.service;

import java.util.ArrayList;
import java.util.Collections;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/**
 * A portfolio risk request. Weights are fractions of capital (long or short), keyed by ticker in
 * answer order.
 *
 * @param weights   portfolio weights (not empty, every value finite)
 * @param benchmark benchmark weights for the tracking error, or null
 * @param scale     horizon of the variances
 * @param missing   what to do with tickers the fit does not cover (in weights and benchmark alike)
 */
public record RiskQuery(Map<String, Double> weights, Map<String, Double> benchmark, Scale scale, MissingTickers missing) {
    public RiskQuery {
        weights = checkWeights(weights, "weights");
        benchmark = benchmark == null ? null : checkWeights(benchmark, "benchmark");
        if (scale == null || missing == null) throw new IllegalArgumentException("scale and missing are required");
    }

    private static Map<String, Double> checkWeights(Map<String, Double> w, String field) {
        if (w == null) throw InvalidInputException.field(field, "is required");
        if (w.isEmpty()) throw InvalidInputException.field(field, "must hold at least one ticker");
        List<InvalidInputException.Issue> issues = new ArrayList<>();
        for (Map.Entry<String, Double> e : w.entrySet()) {
            String problem = Tickers.syntaxProblem(e.getKey());
            if (problem != null) {
                issues.add(new InvalidInputException.Issue(null, field, problem));
            } else if (e.getValue() == null || !Double.isFinite(e.getValue())) {
                issues.add(new InvalidInputException.Issue(null, field + "." + e.getKey(),
                        "weight of '" + e.getKey() + "' must be a finite number, was " + e.getValue()));
            }
        }
        if (!issues.isEmpty()) {
            throw new InvalidInputException(field + ": " + issues.get(0).message()
                    + (issues.size() > 1 ? " (and " + (issues.size() - 1) + " more)" : ""), Tickers.cap(issues));
        }
        // insertion order is the answer order, so no Map.copyOf
        return Collections.unmodifiableMap(new LinkedHashMap<>(w));
    }
}
