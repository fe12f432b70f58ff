package eigencov.service;

import java.time.LocalDate;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/**
 * A {@link FitLookup} over fits held in memory, with the contract's selection rules: newest by
 * default, latest with asOf &lt;= d, or exactly one fit id of the model. Test and benchmark use.
 */
public final class InMemoryFits implements FitLookup {
    private final Map<String, List<ServedFit>> byModel = new LinkedHashMap<>();

    /** Adds a fit; returns this. */
    public InMemoryFits add(ServedFit fit) {
        byModel.computeIfAbsent(fit.ref().model(), m -> new ArrayList<>()).add(fit);
        byModel.get(fit.ref().model()).sort(Comparator.comparing((ServedFit f) -> f.ref().asOf()).thenComparing(f -> f.ref().id()));
        return this;
    }

    @Override
    public ServedFit resolve(String model, LocalDate asOf, Long fitId) {
        List<ServedFit> fits = byModel.get(model);
        if (fits == null || fits.isEmpty()) throw new NotFoundException("model", model);
        if (fitId != null) {
            return fits.stream().filter(f -> f.ref().id() == fitId).findFirst()
                    .orElseThrow(() -> new NotFoundException("fit", fitId + " of model " + model));
        }
        ServedFit best = null;
        for (ServedFit f : fits) {
            if (asOf == null || !f.ref().asOf().isAfter(asOf)) best = f;
        }
        if (best == null) throw new NotFoundException("fit", "as of " + asOf + " of model " + model);
        return best;
    }
}
