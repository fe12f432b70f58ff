package eigencov.service;

import eigencov.math.Exclusion;
import eigencov.math.FactorModel;

import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;

/**
 * Requested tickers matched against a fit's universe: model rows of the covered ones (request
 * order) and where each stood in the request, the uncovered ones, and, for each uncovered one, a
 * located issue saying why. Internal to the service: the arrays are not copied.
 *
 * @param rows         row of each kept ticker in the served model ({@link ServedFit#model()})
 * @param positions    request position of each kept ticker (rows[j] answers tickers[positions[j]])
 * @param shortHistory the kept tickers that are short-history names of the fit, in request order
 */
record TickerSelection(int[] rows, int[] positions, List<String> kept, List<String> omitted, List<InvalidInputException.Issue> issues,
                       List<String> shortHistory) {

    /**
     * @param fieldOf names the request field of the i-th requested ticker (e.g. {@code tickers[3]}, {@code weights.X})
     */
    static TickerSelection of(ServedFit fit, List<String> tickers, java.util.function.IntFunction<String> fieldOf) {
        FactorModel m = fit.model();
        int universe = fit.universeSize();
        List<String> shortHistory = List.of();
        int[] rows = new int[tickers.size()];
        int[] positions = new int[tickers.size()];
        int n = 0;
        List<String> kept = new ArrayList<>(tickers.size());
        List<String> omitted = new ArrayList<>();
        List<InvalidInputException.Issue> issues = new ArrayList<>();
        Map<String, Exclusion> excluded = null;
        for (int i = 0; i < tickers.size(); i++) {
            String t = tickers.get(i);
            int row = m.indexOf(t);
            if (row >= 0) {
                positions[n] = i;
                rows[n++] = row;
                kept.add(t);
                if (row >= universe) {
                    if (shortHistory.isEmpty()) shortHistory = new ArrayList<>();
                    shortHistory.add(t);
                }
                continue;
            }
            if (excluded == null) excluded = byTicker(fit.result().excluded());
            Exclusion why = excluded.get(t);
            omitted.add(t);
            issues.add(new InvalidInputException.Issue(null, fieldOf.apply(i), why == null
                    ? "'" + t + "' is not in the fit's universe"
                    : "'" + t + "' was excluded from the fit (" + why.reason() + ": " + why.observations()
                    + " observations, " + why.required() + " required)"));
        }
        return n == rows.length ? new TickerSelection(rows, positions, kept, omitted, issues, shortHistory)
                : new TickerSelection(java.util.Arrays.copyOf(rows, n), java.util.Arrays.copyOf(positions, n), kept, omitted, issues,
                shortHistory);
    }

    private static Map<String, Exclusion> byTicker(List<Exclusion> list) {
        Map<String, Exclusion> m = new HashMap<>(list.size() * 2);
        for (Exclusion e : list) m.put(e.ticker(), e);
        return m;
    }
}
