package eigencov.service;

import java.util.List;

/** The per-date series of a finished evaluation: one row per forecast date and result entry. */
public record EvaluationSeries(long id, List<EvaluationJob.SeriesRow> series) {
    public EvaluationSeries {
        series = List.copyOf(series);
    }
}
