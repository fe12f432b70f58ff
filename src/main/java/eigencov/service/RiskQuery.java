package eigencov.service;

import java.util.ArrayList;
import java.util.List;

/**
 * A portfolio risk request. Weights are fractions of capital (long or short), in answer order.
 *
 * @param weights   portfolio weights (not empty, every ticker well formed and given once, every value finite)
 * @param benchmark benchmark weights for the tracking error, or null
 * @param scale     horizon of the variances
 * @param missing   what to do with tickers the fit does not cover (in weights and benchmark alike)
 */
public record RiskQuery(Weights weights, Weights benchmark, Scale scale, MissingTickers missing) {
    public RiskQuery {
        check(weights, "weights");
        if (benchmark != null) check(benchmark, "benchmark");
        if (scale == null || missing == null) throw new IllegalArgumentException("scale and missing are required");
    }

    private static void check(Weights w, String field) {
        if (w == null) throw InvalidInputException.field(field, "is required");
        if (w.size() == 0) throw InvalidInputException.field(field, "must hold at least one ticker");
        List<InvalidInputException.Issue> issues = null;
        for (int i = 0; i < w.size(); i++) {
            String t = w.ticker(i);
            String problem = Tickers.syntaxProblem(t);
            String issue = problem;
            String at = field;
            if (problem == null && !Double.isFinite(w.weight(i))) {
                at = field + "." + t;
                issue = "weight of '" + t + "' must be a finite number, was " + (Double.isNaN(w.weight(i)) ? "null or NaN" : w.weight(i));
            }
            if (issue != null) {
                if (issues == null) issues = new ArrayList<>();
                issues.add(new InvalidInputException.Issue(null, at, issue));
            }
        }
        if (issues == null) {
            int repeat = w.firstRepeat();
            if (repeat >= 0) {
                String t = w.ticker(repeat);
                issues = List.of(new InvalidInputException.Issue(null, field + "." + t, "'" + t + "' is given more than once"));
            }
        }
        if (issues != null) {
            throw new InvalidInputException(field + ": " + issues.get(0).message()
                    + (issues.size() > 1 ? " (and " + (issues.size() - 1) + " more)" : ""), Tickers.cap(issues));
        }
    }
}
