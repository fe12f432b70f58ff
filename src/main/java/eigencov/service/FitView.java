package eigencov.service;

import com.fasterxml.jackson.annotation.JsonInclude;
import com.fasterxml.jackson.annotation.JsonPropertyOrder;
import com.fasterxml.jackson.annotation.JsonRawValue;
import eigencov.math.FitResult;
import eigencov.math.ShortHistory;
import eigencov.store.FitRow;

import java.time.Instant;
import java.time.LocalDate;
import java.util.ArrayList;
import java.util.List;

/**
 * A fit attempt as the API shows it. In the list ({@code GET .../fits}) only the bookkeeping;
 * in detail ({@code GET .../fits/{id}}, {@code POST .../fits}) also the universe, the short-history
 * names served beside it (docs/design.md section 6), the spectrum and the diagnostics. A failed
 * attempt has {@code status} "failed" and a {@code reason}.
 */
@JsonInclude(JsonInclude.Include.NON_NULL)
@JsonPropertyOrder({"id", "model", "status", "origin", "asOf", "createdAt", "reason", "k", "tickers", "universe", "shortHistory",
        "dates", "window", "eigenvalues", "varianceShare", "diagnostics", "timings"})
public record FitView(long id, String model, String status, String origin, LocalDate asOf, Instant createdAt, String reason,
                      Integer k, Integer tickers, List<String> universe, Integer dates, Window window, double[] eigenvalues,
                      double[] varianceShare, Diagnostics diagnostics, Timings timings, List<ShortHistoryName> shortHistory) {

    /** A short-history name of the fit and its observations in the window. */
    public record ShortHistoryName(String ticker, int observations) {
    }

    public record Window(LocalDate from, LocalDate to) {
    }

    @JsonInclude(JsonInclude.Include.NON_NULL)
    public record Timings(Long loadMs, Long computeMs, Long storeMs) {
    }

    /**
     * Why the fit looks the way it does: factor-count evidence, gap imputation, alignment to the
     * previous fit, tickers left out, effective observations, and the spec (with its version) used.
     */
    public record Diagnostics(Object factorCount, Object imputation, Object alignment, Object excluded,
                              double effectiveObservations, int specVersion, @JsonRawValue String spec) {
    }

    /** Bookkeeping only (list entries, failed attempts). */
    public static FitView brief(FitRow r) {
        return new FitView(r.id(), r.model(), r.status(), r.origin(), r.asOf(), r.createdAt(), r.reason(), r.factors(), r.tickers(),
                null, r.dates(), r.windowFrom() == null ? null : new Window(r.windowFrom(), r.windowTo()), null, null, null,
                timings(r), null);
    }

    /** Everything of an ok fit. */
    public static FitView detail(FitRow r, FitResult f) {
        return new FitView(r.id(), r.model(), r.status(), r.origin(), r.asOf(), r.createdAt(), r.reason(), f.model().factors(),
                f.model().size(), f.model().tickers(), f.dates().size(), new Window(r.windowFrom(), r.windowTo()), f.eigenvalues(),
                f.varianceShare(), new Diagnostics(f.factorCount(), f.imputation(), f.alignment(), f.excluded(),
                f.effectiveObservations(), r.specVersion(), r.specJson()), timings(r), shortHistory(f.shortHistory()));
    }

    private static List<ShortHistoryName> shortHistory(ShortHistory sh) {
        int[] obs = sh.observations();
        List<ShortHistoryName> out = new ArrayList<>(sh.size());
        for (int i = 0; i < sh.size(); i++) out.add(new ShortHistoryName(sh.tickers().get(i), obs[i]));
        return out;
    }

    private static Timings timings(FitRow r) {
        return r.loadMs() == null && r.computeMs() == null && r.storeMs() == null ? null : new Timings(r.loadMs(), r.computeMs(), r.storeMs());
    }

    public FitView {
        universe = universe == null ? null : List.copyOf(universe);
        shortHistory = shortHistory == null ? null : List.copyOf(shortHistory);
    }
}
