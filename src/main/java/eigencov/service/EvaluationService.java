package eigencov.service;

import com.fasterxml.jackson.core.JsonProcessingException;
import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.node.JsonNodeFactory;
import eigencov.math.ReturnPanel;
import eigencov.store.JobRow;
import eigencov.store.ModelRepository;
import eigencov.store.ModelRow;
import eigencov.store.PanelStore;

import java.time.LocalDate;
import java.util.ArrayList;
import java.util.HashSet;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Set;

/**
 * Model evaluations (docs/design.md section 6, "Evaluation"): validates and plans a request and stores it
 * as a queued {@link EvaluationJob} (an evaluation's id is its job's id); reads evaluations and their
 * per-date series. A rejected request stores nothing.
 */
public final class EvaluationService {
    public static final int MAX_MODELS = 8;
    public static final int MAX_HORIZON_DAYS = 63;
    public static final int MAX_RANDOM_COUNT = 10_000;
    static final List<String> BASELINES = List.of(EvaluationJob.SAMPLE, EvaluationJob.LEDOIT_WOLF);

    private final ModelRepository models;
    private final PanelStore panels;
    private final JobService jobs;
    private final ObjectMapper mapper;

    public EvaluationService(ModelRepository models, PanelStore panels, JobService jobs, ObjectMapper mapper) {
        this.models = models;
        this.panels = panels;
        this.jobs = jobs;
        this.mapper = mapper;
    }

    /**
     * Validates, plans and queues an evaluation.
     *
     * @throws InvalidInputException a bad field (400), or a request the data cannot serve (422): unknown
     *                               models, models on different panels, no forecast date, too few names
     */
    public JobView submit(EvaluationRequest r) {
        if (r == null) throw InvalidInputException.field("body", "an evaluation request is required");
        List<ModelRow> rows = models(r.models());
        BackfillService.requireRange(r.from(), r.to());
        Spacing spacing = Spacing.parse(r.every());
        int h = r.horizonDays() == null ? 1 : r.horizonDays();
        if (h < 1 || h > MAX_HORIZON_DAYS) {
            throw InvalidInputException.field("horizonDays", "must be between 1 and " + MAX_HORIZON_DAYS + " trading days, was " + h);
        }
        List<String> baselines = baselines(r.baselines());
        EvaluationRequest.Random random = random(r.random());
        String panel = rows.get(0).panel();
        List<LocalDate> trading = panels.dates(panel, null, null);
        EvaluationJob.Plan plan = plan(rows, trading, spacing.select(between(trading, r.from(), r.to())), h, r);
        if (random != null) requireNames(panel, trading, plan.dates(), h, random.names());
        EvaluationRequest stored = new EvaluationRequest(rows.stream().map(ModelRow::name).toList(), r.from(), r.to(), spacing.apiName(), h,
                random, baselines);
        int total = rows.size() * plan.dates().size() + plan.dates().size();
        return jobs.view(jobs.submit(EvaluationJob.KIND, JobJson.write(mapper, stored), JobJson.write(mapper, plan), total), true);
    }

    private List<ModelRow> models(List<String> names) {
        if (names == null || names.isEmpty()) throw InvalidInputException.field("models", "is required: 1 to " + MAX_MODELS + " model names");
        if (names.size() > MAX_MODELS) {
            throw InvalidInputException.field("models", "at most " + MAX_MODELS + " models side by side, were " + names.size());
        }
        List<ModelRow> rows = new ArrayList<>();
        List<InvalidInputException.Issue> unknown = new ArrayList<>();
        Set<String> seen = new HashSet<>();
        for (int i = 0; i < names.size(); i++) {
            String n = names.get(i);
            String field = "models[" + i + "]";
            if (n == null || !ModelSpec.NAME.matcher(n).matches()) throw InvalidInputException.field(field, "model names match [A-Za-z0-9._-]{1,64}, was '" + n + "'");
            if (!seen.add(n)) throw InvalidInputException.field(field, "model '" + n + "' is named twice");
            models.find(n).ifPresentOrElse(rows::add, () -> unknown.add(new InvalidInputException.Issue(null, field, "no model named '" + n + "'")));
        }
        if (!unknown.isEmpty()) {
            throw new InvalidInputException(unknown.size() + " of the models do not exist", unknown, true, "unknown-model");
        }
        Set<String> panelsUsed = new java.util.TreeSet<>();
        for (ModelRow m : rows) panelsUsed.add(m.panel());
        if (panelsUsed.size() > 1) {
            throw new InvalidInputException("the models are on different panels " + panelsUsed + "; an evaluation compares models of one panel",
                    List.of(new InvalidInputException.Issue(null, "models", "models on panels " + panelsUsed)), true, "different-panels");
        }
        return rows;
    }

    private static List<String> baselines(List<String> asked) {
        if (asked == null) return List.of();
        Set<String> seen = new HashSet<>();
        for (int i = 0; i < asked.size(); i++) {
            String b = asked.get(i);
            if (!BASELINES.contains(b)) {
                throw InvalidInputException.field("baselines[" + i + "]", "unknown baseline '" + b + "': sample or ledoit-wolf");
            }
            if (!seen.add(b)) throw InvalidInputException.field("baselines[" + i + "]", "baseline '" + b + "' is named twice");
        }
        return List.copyOf(asked);
    }

    private static EvaluationRequest.Random random(EvaluationRequest.Random r) {
        if (r == null) return null;
        if (r.count() == null) throw InvalidInputException.field("random.count", "is required: how many random portfolios (1 to " + MAX_RANDOM_COUNT + ")");
        if (r.count() < 1 || r.count() > MAX_RANDOM_COUNT) {
            throw InvalidInputException.field("random.count", "must be between 1 and " + MAX_RANDOM_COUNT + ", was " + r.count());
        }
        if (r.names() == null) throw InvalidInputException.field("random.names", "is required: names in each random portfolio");
        if (r.names() < 1) throw InvalidInputException.field("random.names", "must be at least 1, was " + r.names());
        return new EvaluationRequest.Random(r.count(), r.names(), r.seed() == null ? 1L : r.seed());
    }

    private static List<LocalDate> between(List<LocalDate> trading, LocalDate from, LocalDate to) {
        return trading.stream().filter(d -> !d.isBefore(from) && !d.isAfter(to)).toList();
    }

    /**
     * The forecast dates: a date with fewer than h later trading dates, or before some model's first full
     * window, is dropped with its reason. None left: a 422.
     */
    private EvaluationJob.Plan plan(List<ModelRow> rows, List<LocalDate> trading, List<LocalDate> candidates, int h, EvaluationRequest r) {
        Map<String, Integer> versions = new LinkedHashMap<>();
        Map<String, Integer> windows = new LinkedHashMap<>();
        for (ModelRow m : rows) {
            versions.put(m.name(), m.version());
            windows.put(m.name(), ModelService.readSpec(mapper, m).windowDays());
        }
        List<LocalDate> kept = new ArrayList<>();
        List<EvaluationJob.Dropped> dropped = new ArrayList<>();
        for (LocalDate t : candidates) {
            int index = java.util.Collections.binarySearch(trading, t);
            int later = trading.size() - 1 - index;
            String why = null;
            if (later < h) why = "only " + later + " later trading date(s) in the panel; the horizon needs " + h;
            for (Map.Entry<String, Integer> w : windows.entrySet()) {
                if (why == null && index + 1 < w.getValue()) {
                    why = "model " + w.getKey() + "'s window needs " + w.getValue() + " dates; the panel has " + (index + 1) + " on or before it";
                }
            }
            if (why == null) kept.add(t);
            else dropped.add(new EvaluationJob.Dropped(t, why));
        }
        if (kept.isEmpty()) {
            String detail = candidates.isEmpty() ? "the panel has no trading date in [" + r.from() + ", " + r.to() + "]"
                    : "none of the " + candidates.size() + " candidate dates in [" + r.from() + ", " + r.to() + "] can be a forecast date: "
                    + dropped.get(dropped.size() - 1).reason();
            throw new InvalidInputException("no forecast date: " + detail, List.of(new InvalidInputException.Issue(null, "from", detail),
                    new InvalidInputException.Issue(null, "to", detail)), true, "no-dates");
        }
        return new EvaluationJob.Plan(versions, kept, dropped);
    }

    /**
     * Random portfolios draw from the names with a return on every horizon date of every forecast date
     * (and, when it runs, in every fit's universe): more names than the first set holds is a 422 now; the
     * run fails with the same message if the fits' universes leave fewer.
     */
    private void requireNames(String panel, List<LocalDate> trading, List<LocalDate> dates, int h, int names) {
        int first = java.util.Collections.binarySearch(trading, dates.get(0)) + 1;
        int last = java.util.Collections.binarySearch(trading, dates.get(dates.size() - 1)) + h;
        ReturnPanel horizon = panels.loadWindow(panel, trading.get(last), last - first + 1);
        Set<LocalDate> needed = new HashSet<>();
        for (LocalDate t : dates) {
            int i = java.util.Collections.binarySearch(trading, t);
            for (int s = 1; s <= h; s++) needed.add(trading.get(i + s));
        }
        int available = 0;
        for (int c = 0; c < horizon.cols(); c++) {
            boolean every = true;
            for (int t = 0; t < horizon.rows() && every; t++) {
                if (needed.contains(horizon.dates().get(t)) && !horizon.observed(t, c)) every = false;
            }
            if (every) available++;
        }
        if (names > available) {
            throw new InvalidInputException("random.names " + names + " is above the " + available + " names available",
                    List.of(new InvalidInputException.Issue(null, "random.names", "at most " + available
                            + ": the names with a return on every horizon date of every forecast date, was " + names)), true, "too-few-names");
        }
    }

    /** Evaluations newest first. */
    public List<EvaluationView> list() {
        return jobs.rows(EvaluationJob.KIND).stream().map(r -> brief(r, jobs.view(r, false))).toList();
    }

    /** One evaluation; 404 unless {@code id} is an evaluation's. */
    public EvaluationView get(long id) {
        JobRow row = row(id);
        return full(row, jobs.view(row, false));
    }

    /**
     * The per-date series of a finished evaluation.
     *
     * @throws ConflictException the evaluation has not finished as done
     */
    public EvaluationSeries series(long id) {
        JobRow row = row(id);
        if (!JobRow.DONE.equals(row.state())) {
            throw new ConflictException("evaluation " + id + " is " + row.state() + " (" + row.done() + "/" + row.total()
                    + " steps); its series is there once it is done");
        }
        EvaluationJob.Outcome o = JobJson.read(mapper, row.resultJson(), EvaluationJob.Outcome.class);
        return new EvaluationSeries(id, o.series());
    }

    private JobRow row(long id) {
        JobRow row = jobs.rowOrNull(id);
        if (row == null || !EvaluationJob.KIND.equals(row.kind())) throw new NotFoundException("evaluation", Long.toString(id));
        return row;
    }

    private EvaluationView brief(JobRow row, JobView job) {
        return new EvaluationView(row.id(), row.state(), job.progress(), tree(row.requestJson()), null, null, null, row.createdAt(),
                row.startedAt(), row.finishedAt(), row.error(), job.links(), EvaluationView.CAUTION);
    }

    private EvaluationView full(JobRow row, JobView job) {
        JsonNode result = tree(row.resultJson());
        JsonNode results = result.has("results") ? result.get("results") : JsonNodeFactory.instance.arrayNode();
        return new EvaluationView(row.id(), row.state(), job.progress(), tree(row.requestJson()), result.get("dates"), result.get("dropped"),
                results, row.createdAt(), row.startedAt(), row.finishedAt(), row.error(), job.links(), EvaluationView.CAUTION);
    }

    private JsonNode tree(String json) {
        try {
            return mapper.readTree(json);
        } catch (JsonProcessingException e) {
            throw new IllegalStateException("stored evaluation cannot be read: " + e.getOriginalMessage(), e);
        }
    }


}
