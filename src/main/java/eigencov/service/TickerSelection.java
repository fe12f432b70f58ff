package eigencov.service;

import eigencov.math.Exclusion;
import eigencov.math.FactorModel;
import eigencov.math.FitResult;

import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;

/**
 * Requested tickers matched against a fit's universe: model rows of the covered ones (request
 * order), the uncovered ones, and, for each uncovered one, a located issue saying why.
 */
record TickerSelection(int[] rows, List<String> kept, List<String> omitted, List<InvalidInputException.Issue> issues) {

    /**
     * @param fieldOf names the request field of the i-th requested ticker (e.g. {@code tickers[3]}, {@code weights.X})
     */
    static TickerSelection of(FitResult fit, List<String> tickers, java.util.function.IntFunction<String> fieldOf) {
        FactorModel m = fit.model();
        int[] rows = new int[tickers.size()];
        int n = 0;
        List<String> kept = new ArrayList<>(tickers.size());
        List<String> omitted = new ArrayList<>();
        List<InvalidInputException.Issue> issues = new ArrayList<>();
        Map<String, Exclusion> excluded = null;
        for (int i = 0; i < tickers.size(); i++) {
            String t = tickers.get(i);
            int row = m.indexOf(t);
            if (row >= 0) {
                rows[n++] = row;
                kept.add(t);
                continue;
            }
            if (excluded == null) excluded = byTicker(fit.excluded());
            Exclusion why = excluded.get(t);
            omitted.add(t);
            issues.add(new InvalidInputException.Issue(null, fieldOf.apply(i), why == null
                    ? "'" + t + "' is not in the fit's universe"
                    : "'" + t + "' was excluded from the fit (" + why.reason() + ": " + why.observations()
                    + " observations, " + why.required() + " required)"));
        }
        return new TickerSelection(java.util.Arrays.copyOf(rows, n), kept, omitted, issues);
    }

    private static Map<String, Exclusion> byTicker(List<Exclusion> list) {
        Map<String, Exclusion> m = new HashMap<>(list.size() * 2);
        for (Exclusion e : list) m.put(e.ticker(), e);
        return m;
    }
}
