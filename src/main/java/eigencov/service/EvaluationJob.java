package eigencov.service;

import com.fasterxml.jackson.annotation.JsonInclude;
import com.fasterxml.jackson.databind.ObjectMapper;
import eigencov.math.FactorFitter;
import eigencov.math.FactorForecast;
import eigencov.math.FactorModel;
import eigencov.math.FitResult;
import eigencov.math.ForecastScores;
import eigencov.math.RandomPortfolios;
import eigencov.math.ReturnPanel;
import eigencov.math.WindowCovariance;
import eigencov.store.FitRepository;
import eigencov.store.JobRow;
import eigencov.store.ModelRow;
import eigencov.store.PanelStore;

import java.time.LocalDate;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Collections;
import java.util.Comparator;
import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.concurrent.ExecutorService;

/**
 * Runs an evaluation (docs/design.md section 6, "Evaluation"; the statistics are {@link ForecastScores},
 * docs/methods.md sections 5, 10 and 11). Two passes over the planned forecast dates t:
 * <ol>
 * <li>Forecasts: each model's fit as of t, the stored one of the job's spec version if there is one,
 *     else made now exactly as {@code POST .../fits {"asOf": t}} would and stored ({@link JobFits}),
 *     so a resumed or repeated evaluation reuses it. A date whose fit fails is dropped with the reason.</li>
 * <li>Scores: the test names of t are those in every model's fit universe with a return on each of the
 *     h trading dates after t; the random portfolios are drawn once from the names that are test names
 *     at every t. Each model's forecast and its baselines (the sample covariance and Ledoit-Wolf of the
 *     model's own window and weights, {@link WindowCovariance}) are scored on the same names.</li>
 * </ol>
 * The panel is read once. A resumed run finds every fit it made before it stopped and scores again
 * from the first date (the scores are cheap next to the fits; nothing is stored twice).
 */
public final class EvaluationJob implements JobKind {
    public static final String KIND = "evaluation";
    public static final String SAMPLE = "sample";
    public static final String LEDOIT_WOLF = "ledoit-wolf";
    /** Fits made in the first pass are kept for the second while their exposures total at most this many cells (64 MB). */
    static final long CACHE_CELLS = 8_000_000;

    /** A candidate forecast date left out, and why. */
    public record Dropped(LocalDate date, String reason) {
    }

    /** What is fixed when the evaluation is asked for: the models' spec versions, the forecast dates and those dropped. */
    public record Plan(Map<String, Integer> specVersions, List<LocalDate> dates, List<Dropped> dropped) {
        public Plan {
            specVersions = Collections.unmodifiableMap(new LinkedHashMap<>(specVersions));
            dates = List.copyOf(dates);
            dropped = List.copyOf(dropped);
        }
    }

    /** One result: a model, or a baseline on that model's windows. */
    public record Entry(String model, @JsonInclude(JsonInclude.Include.NON_NULL) String baseline, Map<String, Object> families,
                        Double logLikelihood) {
    }

    /** One row of the series: z of the equal portfolio, the minimum-variance portfolio's return and forecast volatility over h. */
    public record SeriesRow(LocalDate date, String model, @JsonInclude(JsonInclude.Include.NON_NULL) String baseline, Double z,
                            Double minimumVarianceReturn, Double minimumVarianceVolatility) {
    }

    /** A finished evaluation, as stored. */
    public record Outcome(Map<String, Integer> specVersions, List<LocalDate> dates, List<Dropped> dropped, List<Entry> results,
                          List<SeriesRow> series) {
    }

    private final JobFits jobFits;
    private final FitService fitService;
    private final FitRepository fits;
    private final PanelStore panels;
    private final ObjectMapper mapper;
    private final ExecutorService kernels;

    /** @param kernels the pool the baselines' Gram products are split over (null: the calling thread) */
    EvaluationJob(JobFits jobFits, FitService fitService, FitRepository fits, PanelStore panels, ObjectMapper mapper, ExecutorService kernels) {
        this.jobFits = jobFits;
        this.fitService = fitService;
        this.fits = fits;
        this.panels = panels;
        this.mapper = mapper;
        this.kernels = kernels;
    }

    @Override
    public String name() {
        return KIND;
    }

    @Override
    public Map<String, String> links(JobRow job) {
        Map<String, String> out = new LinkedHashMap<>();
        out.put("evaluation", "/v1/evaluations/" + job.id());
        out.put("series", "/v1/evaluations/" + job.id() + "/series");
        return out;
    }

    @Override
    public Map<String, Object> details(JobRow job) {
        return Map.of();
    }

    /** The names a fit's forecast covers: its universe (short-history names, served apart from it, are not forecast here). */
    static List<String> universe(FitResult r) {
        return r.model().tickers();
    }

    @Override
    public String run(JobRow job, JobContext ctx) {
        EvaluationRequest req = JobJson.read(mapper, job.requestJson(), EvaluationRequest.class);
        Plan plan = JobJson.read(mapper, job.resultJson(), Plan.class);
        int h = req.horizonDays();
        List<String> models = req.models();
        List<ModelSpec> specs = new ArrayList<>();
        List<ModelRow> rows = new ArrayList<>();
        for (String name : models) {
            ModelRow m = jobFits.current(name, plan.specVersions().get(name));
            rows.add(m);
            specs.add(ModelService.readSpec(mapper, m));
        }
        String panel = rows.get(0).panel();
        List<LocalDate> trading = panels.dates(panel, null, null);
        int maxWindow = specs.stream().mapToInt(ModelSpec::windowDays).max().orElseThrow();
        int first = Math.max(0, Collections.binarySearch(trading, plan.dates().get(0)) - maxWindow + 1);
        int last = Collections.binarySearch(trading, plan.dates().get(plan.dates().size() - 1)) + h;
        ReturnPanel all = panels.loadWindow(panel, trading.get(last), last - first + 1);

        Forecasts forecasts = forecasts(job, ctx, plan, rows, all);
        Tests tests = tests(plan, forecasts, all, h, req.random());
        int steps = rows.size() * plan.dates().size();
        List<String> baselines = req.baselines() == null ? List.of() : req.baselines();
        int entriesPerModel = 1 + baselines.size();
        ForecastScores[] scores = new ForecastScores[rows.size() * entriesPerModel];
        int randomCount = tests.members == null ? 0 : tests.members.length;
        for (int e = 0; e < scores.length; e++) scores[e] = new ForecastScores(h, all.cols(), randomCount);

        for (int j = 0; j < tests.dates.size(); j++) {
            int i = tests.dateIndex.get(j);
            LocalDate t = plan.dates().get(i);
            int[] cols = tests.names.get(j);
            double[] realised = realised(all, t, cols, h);
            int[][] members = tests.membersAt(cols);
            for (int a = 0; a < rows.size(); a++) {
                FitResult fit = forecasts.result(a, i);
                FactorModel model = fit.model();
                int[] at = new int[cols.length];
                for (int c = 0; c < cols.length; c++) at[c] = model.indexOf(all.tickers().get(cols[c]));
                scores[a * entriesPerModel].add(t, new FactorForecast(model, at), realised, cols, members, tests.weights);
                if (baselines.isEmpty()) continue;
                WindowCovariance window = window(all, fit.dates(), cols, specs.get(a).halfLifeDays());
                for (int b = 0; b < baselines.size(); b++) {
                    var c = SAMPLE.equals(baselines.get(b)) ? window.sample() : window.ledoitWolf();
                    scores[a * entriesPerModel + 1 + b].add(t, c, realised, cols, members, tests.weights);
                }
            }
            if (steps + i + 1 > ctx.doneAtStart()) ctx.progress(steps + i + 1, null);
        }

        List<Entry> results = new ArrayList<>();
        List<ForecastScores.Scores> done = new ArrayList<>();
        List<String[]> labels = new ArrayList<>();
        for (int a = 0; a < rows.size(); a++) {
            for (int b = 0; b < entriesPerModel; b++) {
                ForecastScores.Scores s = scores[a * entriesPerModel + b].result();
                String baseline = b == 0 ? null : baselines.get(b - 1);
                results.add(entry(models.get(a), baseline, s, req.random() != null));
                done.add(s);
                labels.add(new String[] {models.get(a), baseline});
            }
        }
        List<SeriesRow> series = new ArrayList<>();
        for (int j = 0; j < tests.dates.size(); j++) {
            for (int e = 0; e < done.size(); e++) {
                ForecastScores.Point p = done.get(e).series().get(j);
                series.add(new SeriesRow(p.date(), labels.get(e)[0], labels.get(e)[1], Double.isFinite(p.z()) ? p.z() : null,
                        p.minimumVarianceReturn(), p.minimumVarianceVolatility()));
            }
        }
        List<Dropped> dropped = new ArrayList<>(plan.dropped());
        dropped.addAll(tests.dropped);
        dropped.sort(Comparator.comparing(Dropped::date));
        return JobJson.write(mapper, new Outcome(plan.specVersions(), tests.dates, dropped, results, series));
    }

    private static Entry entry(String model, String baseline, ForecastScores.Scores s, boolean random) {
        Map<String, Object> families = new LinkedHashMap<>();
        families.put("equal", s.equal());
        families.put("single", s.single());
        if (random) families.put("random", s.random());
        families.put("minimum-variance", s.minimumVariance());
        return new Entry(model, baseline, families, s.logLikelihood());
    }

    /** Each model's fit at each planned date: ids, universes, failures, and the results made here (kept while small). */
    private static final class Forecasts {
        final long[][] ids;
        final List<List<List<String>>> universes = new ArrayList<>();
        final String[][] failed;
        final Map<Long, FitResult> made = new HashMap<>();
        final FitService fitService;
        long cachedCells;

        Forecasts(int models, int dates, FitService fitService) {
            ids = new long[models][dates];
            failed = new String[models][dates];
            this.fitService = fitService;
            for (int a = 0; a < models; a++) universes.add(new ArrayList<>(Collections.nCopies(dates, null)));
        }

        FitResult result(int model, int date) {
            FitResult r = made.get(ids[model][date]);
            return r != null ? r : fitService.stored(ids[model][date]);
        }
    }

    private Forecasts forecasts(JobRow job, JobContext ctx, Plan plan, List<ModelRow> rows, ReturnPanel all) {
        int dates = plan.dates().size();
        Forecasts f = new Forecasts(rows.size(), dates, fitService);
        int step = 0;
        for (int a = 0; a < rows.size(); a++) {
            ModelRow m = rows.get(a);
            int version = plan.specVersions().get(m.name());
            Map<LocalDate, List<FitRepository.Mark>> marks = fits.attemptsAt(m.id(), plan.dates());
            for (int i = 0; i < dates; i++) {
                LocalDate t = plan.dates().get(i);
                Optional<JobFits.Result> known = JobFits.classify(marks.get(t), version, job.id());
                if (known.isEmpty()) ctx.checkRunning();
                JobFits.Result r = known.isPresent() ? known.get() : jobFits.ensure(m.name(), version, t, all, job.id(), FitService.EVALUATION);
                if (r.outcome() == JobFits.Outcome.FAILED) {
                    f.failed[a][i] = "model " + m.name() + ": fit " + r.fitId() + " failed: " + r.reason();
                } else {
                    f.ids[a][i] = r.fitId();
                    if (r.result() != null) {
                        f.universes.get(a).set(i, universe(r.result()));
                        long cells = (long) r.result().model().size() * r.result().model().factors();
                        if (f.cachedCells + cells <= CACHE_CELLS) {
                            f.made.put(r.fitId(), r.result());
                            f.cachedCells += cells;
                        }
                    } else {
                        f.universes.get(a).set(i, fits.universe(r.fitId())
                                .orElseThrow(() -> new IllegalStateException("fit " + r.fitId() + " has no stored data")));
                    }
                }
                step++;
                if (step > ctx.doneAtStart()) ctx.progress(step, null);
            }
        }
        return f;
    }

    /** The scored dates, their test names (panel columns, ascending) and the random portfolios. */
    private static final class Tests {
        final List<LocalDate> dates = new ArrayList<>();
        final List<Integer> dateIndex = new ArrayList<>();
        final List<int[]> names = new ArrayList<>();
        final List<Dropped> dropped = new ArrayList<>();
        /** Random portfolios as panel columns, or null. */
        int[][] members;
        double[][] weights;

        /** The random portfolios' positions among one date's test names. */
        int[][] membersAt(int[] cols) {
            if (members == null) return null;
            Map<Integer, Integer> pos = new HashMap<>(cols.length * 2);
            for (int c = 0; c < cols.length; c++) pos.put(cols[c], c);
            int[][] out = new int[members.length][];
            for (int p = 0; p < members.length; p++) {
                out[p] = new int[members[p].length];
                for (int a = 0; a < members[p].length; a++) out[p][a] = pos.get(members[p][a]);
            }
            return out;
        }
    }

    private static Tests tests(Plan plan, Forecasts f, ReturnPanel all, int h, EvaluationRequest.Random random) {
        Tests tests = new Tests();
        Map<String, Integer> col = new HashMap<>(all.cols() * 2);
        for (int c = 0; c < all.cols(); c++) col.put(all.tickers().get(c), c);
        int[] inCommon = new int[all.cols()];
        for (int i = 0; i < plan.dates().size(); i++) {
            LocalDate t = plan.dates().get(i);
            String failure = null;
            for (String[] row : f.failed) if (failure == null && row[i] != null) failure = row[i];
            if (failure != null) {
                tests.dropped.add(new Dropped(t, failure));
                continue;
            }
            Arrays.fill(inCommon, 0);
            for (List<List<String>> u : f.universes) for (String name : u.get(i)) inCommon[col.get(name)]++;
            int row = Collections.binarySearch(all.dates(), t);
            List<Integer> kept = new ArrayList<>();
            for (int c = 0; c < all.cols(); c++) {
                if (inCommon[c] != f.universes.size()) continue;
                boolean every = true;
                for (int s = 1; s <= h && every; s++) every = all.observed(row + s, c);
                if (every) kept.add(c);
            }
            if (kept.size() < 2) {
                tests.dropped.add(new Dropped(t, kept.size() + " name(s) in every model's universe with a return on each of the " + h
                        + " later trading date(s); an evaluation needs 2"));
                continue;
            }
            tests.dates.add(t);
            tests.dateIndex.add(i);
            tests.names.add(kept.stream().mapToInt(Integer::intValue).toArray());
        }
        if (tests.dates.isEmpty()) throw new IllegalStateException("no forecast date is left: " + tests.dropped.get(0).reason());
        if (random != null) {
            int[] present = new int[all.cols()];
            for (int[] cols : tests.names) for (int c : cols) present[c]++;
            List<Integer> pool = new ArrayList<>();
            for (int c = 0; c < all.cols(); c++) if (present[c] == tests.dates.size()) pool.add(c);
            if (random.names() > pool.size()) {
                throw new IllegalStateException("random.names " + random.names() + " is above the " + pool.size()
                        + " names in every model's universe with a return over every horizon");
            }
            List<RandomPortfolios.Portfolio> drawn = RandomPortfolios.draw(pool.size(), random.count(), random.names(), random.seed());
            tests.members = new int[drawn.size()][];
            tests.weights = new double[drawn.size()][];
            for (int p = 0; p < drawn.size(); p++) {
                int[] m = drawn.get(p).members();
                for (int a = 0; a < m.length; a++) m[a] = pool.get(m[a]);
                tests.members[p] = m;
                tests.weights[p] = drawn.get(p).weights();
            }
        }
        return tests;
    }

    /** {@code r_i = sum_{s=1..h} x_{i,t+s}} for the given panel columns (each observed on all h dates). */
    private static double[] realised(ReturnPanel all, LocalDate t, int[] cols, int h) {
        int row = Collections.binarySearch(all.dates(), t);
        double[] r = new double[cols.length];
        for (int s = 1; s <= h; s++) {
            for (int c = 0; c < cols.length; c++) r[c] += all.value(row + s, cols[c]);
        }
        return r;
    }

    /** The fit's window (its dates, the given names) with the model's weights. */
    private WindowCovariance window(ReturnPanel all, List<LocalDate> dates, int[] cols, Double halfLifeDays) {
        int t0 = Collections.binarySearch(all.dates(), dates.get(0));
        int n = cols.length;
        double[] values = new double[dates.size() * n];
        for (int t = 0; t < dates.size(); t++) {
            if (!all.dates().get(t0 + t).equals(dates.get(t))) {
                throw new IllegalStateException("window date " + dates.get(t) + " of a fit is not a panel date any more");
            }
            for (int c = 0; c < n; c++) values[t * n + c] = all.value(t0 + t, cols[c]);
        }
        return WindowCovariance.of(values, dates.size(), n, FactorFitter.weights(dates.size(), halfLifeDays), kernels);
    }


}
