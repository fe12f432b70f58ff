package eigencov.service;

import java.time.LocalDate;
import java.util.List;

/**
 * Which fit of a model a query reads: the latest fit with asOf &lt;= {@code asOf}, exactly the fit
 * {@code fitId}, or (both null) the newest fit. Giving both is rejected.
 */
public record FitSelector(LocalDate asOf, Long fitId) {
    private static final FitSelector NEWEST = new FitSelector(null, null);

    public FitSelector {
        if (asOf != null && fitId != null) {
            throw new InvalidInputException("give asOf or fit, not both", List.of(
                    new InvalidInputException.Issue(null, "asOf", "cannot be combined with fit"),
                    new InvalidInputException.Issue(null, "fit", "cannot be combined with asOf")));
        }
    }

    public static FitSelector newest() {
        return NEWEST;
    }
}
