package eigencov.app;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import eigencov.service.IngestResult;
import eigencov.service.PanelService;
import eigencov.service.ReturnsFormat;
import eigencov.store.PanelSummary;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

import java.io.BufferedInputStream;
import java.io.IOException;
import java.io.InputStream;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Optional;
import java.util.zip.GZIPInputStream;

/**
 * {@code --demo}: on first start, fills the store from the demo folder. The folder holds
 * {@code models.json} (field {@code "panel"} names the demo panel) and {@code returns.csv.gz}
 * (gzip CSV {@code date,ticker,value}), loaded through the same {@link PanelService#ingest} as an
 * HTTP upload. Each step is skipped when its result is already in the store, so restarts with
 * {@code --demo} change nothing. Later steps (models, fits) go in {@link #load} after the panel.
 */
final class DemoLoader {
    private static final Logger LOG = LoggerFactory.getLogger(DemoLoader.class);
    static final String MODELS_FILE = "models.json";
    static final String RETURNS_FILE = "returns.csv.gz";

    private final Path dir;
    private final PanelService panels;
    private final ObjectMapper mapper;

    DemoLoader(Path dir, PanelService panels, ObjectMapper mapper) {
        this.dir = dir;
        this.panels = panels;
        this.mapper = mapper;
    }

    /** Runs every demo step in order. */
    void load() {
        JsonNode manifest = manifest();
        String panel = manifest.path("panel").asText("");
        if (panel.isEmpty()) throw new IllegalStateException(dir.resolve(MODELS_FILE) + " has no \"panel\" field");
        loadPanel(panel);
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
