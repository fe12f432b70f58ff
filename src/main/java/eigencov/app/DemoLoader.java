package eigencov.app;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.node.ObjectNode;
import eigencov.service.BackfillService;
import eigencov.service.EvaluationRequest;
import eigencov.service.EvaluationService;
import eigencov.service.IngestResult;
import eigencov.service.JobService;
import eigencov.service.JobView;
import eigencov.service.ModelService;
import eigencov.service.ModelSpec;
import eigencov.service.ModelView;
import eigencov.service.PanelService;
import eigencov.service.ReturnsFormat;
import eigencov.service.Spacing;
import eigencov.store.PanelStore;
import eigencov.store.PanelSummary;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

import java.io.BufferedInputStream;
import java.io.IOException;
import java.io.InputStream;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.time.LocalDate;
import java.util.ArrayList;
import java.util.HashSet;
import java.util.List;
import java.util.Locale;
import java.util.Optional;
import java.util.Set;
import java.util.zip.GZIPInputStream;

/**
 * {@code --demo}: on first start, fills the store from the demo folder. The folder holds
 * {@code models.json} (field {@code "panel"} names the demo panel) and {@code returns.csv.gz}
 * (gzip CSV {@code date,ticker,value}), loaded through the same {@link PanelService#ingest} as an
 * HTTP upload. Then it creates the models of {@code models.json} (field {@code "models"}: name and
 * PUT body) and backfills each with a fit at every month end that has a full window
 * ({@code "backfill": "monthly"}) as a range backfill job, so {@code asOf} queries work at once.
 * Last, when {@code models.json} has an {@code "evaluation"} (an evaluation request without
 * {@code models}, {@code from} and {@code to}, plus {@code lookbackDays}), it evaluates all the demo
 * models over the last {@code lookbackDays} calendar days where every model has a full window. The
 * jobs run on the calling thread and log their progress. Each step is skipped when its result is
 * already in the store, so restarts with {@code --demo} change nothing (a job a killed first start
 * left unfinished is resumed by the job runner).
 */
final class DemoLoader {
    private static final Logger LOG = LoggerFactory.getLogger(DemoLoader.class);
    static final String MODELS_FILE = "models.json";
    static final String RETURNS_FILE = "returns.csv.gz";
    /** Longest wait for a demo job that another thread or instance runs. */
    private static final Duration JOB_WAIT = Duration.ofHours(1);

    private final Path dir;
    private final PanelService panels;
    private final PanelStore panelStore;
    private final ModelService models;
    private final BackfillService backfills;
    private final EvaluationService evaluations;
    private final JobService jobs;
    private final ObjectMapper mapper;

    DemoLoader(Path dir, PanelService panels, PanelStore panelStore, ModelService models, BackfillService backfills,
               EvaluationService evaluations, JobService jobs, ObjectMapper mapper) {
        this.dir = dir;
        this.panels = panels;
        this.panelStore = panelStore;
        this.models = models;
        this.backfills = backfills;
        this.evaluations = evaluations;
        this.jobs = jobs;
        this.mapper = mapper;
    }

    /** Runs every demo step in order. */
    void load() {
        long started = System.nanoTime();
        JsonNode manifest = manifest();
        String panel = manifest.path("panel").asText("");
        if (panel.isEmpty()) throw new IllegalStateException(dir.resolve(MODELS_FILE) + " has no \"panel\" field");
        loadPanel(panel);
        String backfill = manifest.path("backfill").asText("monthly");
        if (!backfill.equals("monthly")) throw new IllegalStateException(dir.resolve(MODELS_FILE) + ": backfill must be \"monthly\", was " + backfill);
        int made = loadModels(panel, manifest.path("models"));
        if (manifest.has("evaluation")) evaluate(panel, manifest.path("models"), manifest.path("evaluation"));
        LOG.info("demo: ready in {} ms ({} fits made by the backfills)", (System.nanoTime() - started) / 1_000_000, made);
    }

    /** Creates each demo model that does not exist yet and backfills its month ends; returns the fits made. */
    int loadModels(String panel, JsonNode list) {
        List<LocalDate> dates = panelStore.dates(panel, null, null);
        Set<String> existing = new HashSet<>();
        for (ModelView m : models.list()) existing.add(m.name());
        int made = 0;
        for (JsonNode entry : list) {
            String name = entry.path("name").asText("");
            if (name.isEmpty()) throw new IllegalStateException(dir.resolve(MODELS_FILE) + ": a model has no \"name\"");
            if (existing.contains(name)) continue;
            ModelSpec spec;
            try {
                spec = mapper.treeToValue(entry.path("spec"), ModelSpec.class);
            } catch (IOException e) {
                throw new IllegalStateException(dir.resolve(MODELS_FILE) + ": spec of model " + name + " is invalid: " + e.getMessage(), e);
            }
            models.put(name, spec);
            if (dates.size() < spec.windowDays()) {
                LOG.warn("demo: model {} needs {} dates, the panel has {}: no backfill", name, spec.windowDays(), dates.size());
                continue;
            }
            long started = System.nanoTime();
            JobView job = backfills.submit(name, dates.get(spec.windowDays() - 1), dates.get(dates.size() - 1), Spacing.MONTH.apiName());
            JobView done = runToEnd(job.id());
            made += ((List<?>) done.kindFields().get("fits")).size();
            LOG.info("demo: model {} backfilled by job {} ({}): {} monthly fits, {} failed, in {} ms", name, job.id(), done.state(),
                    ((List<?>) done.kindFields().get("fits")).size(), ((List<?>) done.kindFields().get("failed")).size(),
                    (System.nanoTime() - started) / 1_000_000);
        }
        return made;
    }

    /**
     * Evaluates every demo model, unless an evaluation exists already: over the last {@code lookbackDays}
     * calendar days of the panel from the first date where every model has a full window.
     */
    void evaluate(String panel, JsonNode list, JsonNode evaluation) {
        if (!evaluations.list().isEmpty()) return;
        List<LocalDate> dates = panelStore.dates(panel, null, null);
        List<String> names = new ArrayList<>();
        int window = 1;
        for (JsonNode entry : list) {
            names.add(entry.path("name").asText());
            window = Math.max(window, entry.path("spec").path("windowDays").asInt(1));
        }
        if (dates.size() < window) return;
        LocalDate to = dates.get(dates.size() - 1);
        LocalDate from = to.minusDays(evaluation.path("lookbackDays").asLong(365));
        if (from.isBefore(dates.get(window - 1))) from = dates.get(window - 1);
        ObjectNode request = evaluation.deepCopy();
        request.remove("lookbackDays");
        request.set("models", mapper.valueToTree(names));
        request.put("from", from.toString());
        request.put("to", to.toString());
        EvaluationRequest r;
        try {
            r = mapper.treeToValue(request, EvaluationRequest.class);
        } catch (IOException e) {
            throw new IllegalStateException(dir.resolve(MODELS_FILE) + ": evaluation is invalid: " + e.getMessage(), e);
        }
        long started = System.nanoTime();
        JobView job = evaluations.submit(r);
        JobView done = runToEnd(job.id());
        LOG.info("demo: evaluation {} of {} from {} to {} {} in {} ms", job.id(), names, from, to, done.state(),
                (System.nanoTime() - started) / 1_000_000);
        for (JsonNode e : evaluations.get(job.id()).results()) LOG.info("demo: evaluation {}: {}", job.id(), headline(e));
    }

    /** One result in a line: equal-portfolio bias and band, single names inside their band, minimum-variance volatility. */
    static String headline(JsonNode e) {
        JsonNode f = e.path("families");
        JsonNode eq = f.path("equal");
        JsonNode mv = f.path("minimum-variance");
        return String.format(Locale.ROOT, "%s%s: equal bias %.3f (band %.3f-%.3f, n %d), single names inside %.0f %%, "
                        + "minimum-variance volatility %s, log-likelihood %s",
                e.path("model").asText(), e.has("baseline") ? " / " + e.path("baseline").asText() : "", eq.path("bias").asDouble(),
                eq.path("band").path(0).asDouble(), eq.path("band").path(1).asDouble(), eq.path("n").asInt(),
                100 * f.path("single").path("insideBand").asDouble(),
                mv.isNull() || mv.isMissingNode() ? "n/a" : String.format(Locale.ROOT, "%.1f %%", 100 * mv.path("realisedVolatility").asDouble()),
                e.path("logLikelihood").isNumber() ? String.format(Locale.ROOT, "%.1f", e.path("logLikelihood").asDouble()) : "n/a");
    }

    /** Runs the job here (or, when another thread holds it, waits for it) and returns it finished. */
    private JobView runToEnd(long id) {
        jobs.runner().run(id);
        try {
            jobs.runner().awaitFinished(id, JOB_WAIT).orElseThrow(() -> new IllegalStateException("demo job " + id + " did not finish"));
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            throw new IllegalStateException("interrupted while waiting for demo job " + id, e);
        }
        return jobs.get(id);
    }

    /** The parsed {@code models.json}. */
    JsonNode manifest() {
        Path file = dir.resolve(MODELS_FILE);
        if (!Files.isRegularFile(file)) {
            throw new IllegalStateException("--demo needs " + file.toAbsolutePath() + " (run from the repository root, or set --demo-dir)");
        }
        try {
            return mapper.readTree(file.toFile());
        } catch (IOException e) {
            throw new UncheckedIOException("cannot read " + file, e);
        }
    }

    /** Loads the demo returns into {@code panel} unless the panel already holds rows. */
    void loadPanel(String panel) {
        Optional<PanelSummary> existing = panels.panels().stream().filter(p -> p.name().equals(panel)).findFirst();
        if (existing.isPresent() && existing.get().rows() > 0) {
            LOG.info("demo: panel {} already holds {} rows; not loading {}", panel, existing.get().rows(), RETURNS_FILE);
            return;
        }
        Path file = dir.resolve(RETURNS_FILE);
        long started = System.nanoTime();
        try (InputStream in = new GZIPInputStream(new BufferedInputStream(Files.newInputStream(file)), 64 * 1024)) {
            IngestResult r = panels.ingest(panel, ReturnsFormat.CSV, in);
            LOG.info("demo: loaded {} rows ({} tickers, {} to {}) into panel {} in {} ms", r.inserted(), r.tickers(), r.from(), r.to(),
                    panel, (System.nanoTime() - started) / 1_000_000);
        } catch (IOException e) {
            throw new UncheckedIOException("cannot read " + file.toAbsolutePath(), e);
        }
    }
}
