package eigencov.service;

import com.fasterxml.jackson.databind.ObjectMapper;
import eigencov.store.ModelRepository;
import eigencov.store.ModelRow;
import eigencov.store.PanelStore;

import java.time.LocalDate;
import java.util.List;

/**
 * Starts range backfills ({@code POST /v1/models/{model}/fits} with {@code from}, {@code to},
 * {@code every}): validates the request, plans its dates and stores it as a queued
 * {@link BackfillJob}. A rejected request stores nothing.
 */
public final class BackfillService {
    private final ModelRepository models;
    private final PanelStore panels;
    private final JobService jobs;
    private final ObjectMapper mapper;

    public BackfillService(ModelRepository models, PanelStore panels, JobService jobs, ObjectMapper mapper) {
        this.models = models;
        this.panels = panels;
        this.jobs = jobs;
        this.mapper = mapper;
    }

    /**
     * @throws NotFoundException     no such model
     * @throws InvalidInputException a missing or bad field (400), or no trading date of the panel in the range (422)
     */
    public JobView submit(String model, LocalDate from, LocalDate to, String every) {
        ModelRow m = models.find(model).orElseThrow(() -> new NotFoundException("model", model));
        List<LocalDate> dates = plan(m, from, to, every);
        BackfillJob.Request request = new BackfillJob.Request(model, from, to, Spacing.parse(every).apiName());
        BackfillJob.Result plan = new BackfillJob.Result(m.version(), dates, List.of(), List.of(), List.of());
        return jobs.view(jobs.submit(BackfillJob.KIND, JobJson.write(mapper, request), JobJson.write(mapper, plan), dates.size()), true);
    }

    private List<LocalDate> plan(ModelRow m, LocalDate from, LocalDate to, String every) {
        requireRange(from, to);
        Spacing spacing = Spacing.parse(every);
        ModelSpec spec = ModelService.readSpec(mapper, m);
        List<LocalDate> dates = spacing.select(panels.dates(spec.panel(), from, to));
        if (dates.isEmpty()) {
            throw new InvalidInputException("panel '" + spec.panel() + "' has no trading date in [" + from + ", " + to + "]",
                    List.of(new InvalidInputException.Issue(null, "from", "no trading date of panel '" + spec.panel() + "' from " + from),
                            new InvalidInputException.Issue(null, "to", "to " + to)), true, "no-dates");
        }
        return dates;
    }

    /** {@code from} and {@code to} given, in order; a 400 naming the field otherwise. */
    static void requireRange(LocalDate from, LocalDate to) {
        if (from == null) throw InvalidInputException.field("from", "is required (first date of the range, YYYY-MM-DD)");
        if (to == null) throw InvalidInputException.field("to", "is required (last date of the range, YYYY-MM-DD)");
        if (from.isAfter(to)) throw InvalidInputException.field("from", "must not be after to (" + from + " > " + to + ")");
    }

}
