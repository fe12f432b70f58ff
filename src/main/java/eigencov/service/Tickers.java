package eigencov.service;

import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.regex.Pattern;

/** Validation of requested ticker lists (docs/design.md section 3: tickers match {@code [A-Za-z0-9._:/-]{1,32}}). */
final class Tickers {
    static final Pattern SYNTAX = Pattern.compile("[A-Za-z0-9._:/-]{1,32}");

    private Tickers() {
    }

    /**
     * Checks {@code tickers} (not null, not empty, each well formed, no repeats), naming each bad
     * element {@code field[i]}; returns an unmodifiable copy.
     */
    static List<String> checkList(List<String> tickers, String field) {
        if (tickers == null) throw InvalidInputException.field(field, "is required");
        if (tickers.isEmpty()) throw InvalidInputException.field(field, "must name at least one ticker");
        List<InvalidInputException.Issue> issues = new ArrayList<>();
        Map<String, Integer> seen = new HashMap<>(tickers.size() * 2);
        for (int i = 0; i < tickers.size(); i++) {
            String t = tickers.get(i);
            String at = field + "[" + i + "]";
            String problem = syntaxProblem(t);
            if (problem != null) {
                issues.add(new InvalidInputException.Issue(null, at, problem));
                continue;
            }
            Integer first = seen.putIfAbsent(t, i);
            if (first != null) issues.add(new InvalidInputException.Issue(null, at, "'" + t + "' repeats " + field + "[" + first + "]"));
        }
        if (!issues.isEmpty()) {
            throw new InvalidInputException(field + ": " + issues.size() + " invalid entr" + (issues.size() == 1 ? "y" : "ies")
                    + ", first " + issues.get(0).field() + ": " + issues.get(0).message(), cap(issues));
        }
        return List.copyOf(tickers);
    }

    /** Why {@code t} is not a well-formed ticker, or null when it is. */
    static String syntaxProblem(String t) {
        if (t == null) return "must be a ticker, was null";
        if (!wellFormed(t)) return "'" + abbreviate(t) + "' is not a ticker (1-32 of A-Z a-z 0-9 . _ : / -)";
        return null;
    }

    /**
     * Same test as {@link #SYNTAX}, as a plain loop: a 3,000-name portfolio checks 3,000 tickers per
     * request, and a measurement showed the regex costing about as much as the risk computation.
     */
    static boolean wellFormed(String t) {
        int n = t.length();
        if (n < 1 || n > 32) return false;
        for (int i = 0; i < n; i++) {
            char c = t.charAt(i);
            boolean ok = (c >= 'A' && c <= 'Z') || (c >= 'a' && c <= 'z') || (c >= '0' && c <= '9')
                    || c == '.' || c == '_' || c == ':' || c == '/' || c == '-';
            if (!ok) return false;
        }
        return true;
    }

    /** At most 100 issues are reported; a client sending 3,000 bad names needs the first ones, not all. */
    static List<InvalidInputException.Issue> cap(List<InvalidInputException.Issue> issues) {
        return issues.size() <= 100 ? issues : issues.subList(0, 100);
    }

    private static String abbreviate(String s) {
        return s.length() <= 40 ? s : s.substring(0, 40) + "...";
    }
}
