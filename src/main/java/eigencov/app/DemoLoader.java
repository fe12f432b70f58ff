package eigencov.app;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import eigencov.service.FitService;
import eigencov.service.FitView;
import eigencov.service.IngestResult;
import eigencov.service.ModelService;
import eigencov.service.ModelSpec;
import eigencov.service.ModelView;
import eigencov.service.PanelService;
import eigencov.service.ReturnsFormat;
import eigencov.store.FitRow;
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
import java.time.LocalDate;
import java.time.YearMonth;
import java.util.ArrayList;
import java.util.HashSet;
import java.util.List;
import java.util.Optional;
import java.util.Set;
import java.util.zip.GZIPInputStream;

/**
 * {@code --demo}: on first start, fills the store from the demo folder. The folder holds
 * {@code models.json} (field {@code "panel"} names the demo panel) and {@code returns.csv.gz}
 * (gzip CSV {@code date,ticker,value}), loaded through the same {@link PanelService#ingest} as an
 * HTTP upload. Then it creates the models of {@code models.json} (field {@code "models"}: name and
 * PUT body) and backfills each with a fit at every month end that has a full window
 * ({@code "backfill": "monthly"}), so {@code asOf} queries work at once. Each step is skipped when
 * its result is already in the store, so restarts with {@code --demo} change nothing.
 */
final class DemoLoader {
    private static final Logger LOG = LoggerFactory.getLogger(DemoLoader.class);
    static final String MODELS_FILE = "models.json";
    static final String RETURNS_FILE = "returns.csv.gz";

    private final Path dir;
    private final PanelService panels;
    private final PanelStore panelStore;
    private final ModelService models;
    private final FitService fits;
    private final ObjectMapper mapper;

    DemoLoader(Path dir, PanelService panels, PanelStore panelStore, ModelService models, FitService fits, ObjectMapper mapper) {
        this.dir = dir;
        this.panels = panels;
        this.panelStore = panelStore;
        this.models = models;
        this.fits = fits;
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
        LOG.info("demo: ready in {} ms ({} fits made)", (System.nanoTime() - started) / 1_000_000, made);
    }

    /** Creates each demo model that does not exist yet and backfills its monthly fits; returns the fits made. */
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
            long started = System.nanoTime();
            List<FitView> done = fits.backfill(name, monthEnds(dates, spec.windowDays()));
            long ok = done.stream().filter(f -> f.status().equals(FitRow.OK)).count();
            made += done.size();
            LOG.info("demo: model {} backfilled with {} monthly fits ({} failed) in {} ms", name, ok, done.size() - ok,
                    (System.nanoTime() - started) / 1_000_000);
        }
        return made;
    }

    /** The last date of each month in {@code dates} (ascending) with at least {@code windowDays} dates up to it. */
    static List<LocalDate> monthEnds(List<LocalDate> dates, int windowDays) {
        List<LocalDate> out = new ArrayList<>();
        for (int i = Math.max(windowDays, 1) - 1; i < dates.size(); i++) {
            LocalDate d = dates.get(i);
            if (i == dates.size() - 1 || !YearMonth.from(dates.get(i + 1)).equals(YearMonth.from(d))) out.add(d);
        }
        return out;
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
