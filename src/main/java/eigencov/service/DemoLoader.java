package eigencov.service;

import com.fasterxml.jackson.databind.ObjectMapper;
import eigencov.store.ReturnWriter;
import eigencov.store.WindowReader;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

import java.io.BufferedReader;
import java.io.IOException;
import java.io.InputStreamReader;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.LocalDate;
import java.time.format.DateTimeParseException;
import java.util.ArrayList;
import java.util.List;
import java.util.zip.GZIPInputStream;

/**
 * {@code serve --demo}: on first start loads {@code returns.csv.gz} (date,ticker,value) into the demo
 * panel, creates the models of {@code models.json} and backfills a fit at every month end that has
 * a full window, so {@code asOf} queries work at once. Each step is skipped when already done, so a
 * restart on the same store does nothing.
 */
public final class DemoLoader {
    private static final Logger LOG = LoggerFactory.getLogger(DemoLoader.class);

    /** {@code models.json}: the panel, the models with their PUT bodies, and the backfill cadence. */
    public record DemoModels(String panel, List<DemoModel> models, String backfill) {
    }

    public record DemoModel(String name, ModelSpec spec) {
    }

    private final ReturnWriter returns;
    private final WindowReader panels;
    private final ModelService models;
    private final FitService fits;
    private final ObjectMapper mapper;

    public DemoLoader(ReturnWriter returns, WindowReader panels, ModelService models, FitService fits, ObjectMapper mapper) {
        this.returns = returns;
        this.panels = panels;
        this.models = models;
        this.fits = fits;
        this.mapper = mapper;
    }

    /** Loads what is not loaded yet; returns the number of fits made. */
    public int loadIfAbsent(Path dir) {
        long t0 = System.nanoTime();
        DemoModels demo;
        try {
            demo = mapper.readValue(dir.resolve("models.json").toFile(), DemoModels.class);
        } catch (IOException e) {
            throw new UncheckedIOException("cannot read " + dir.resolve("models.json") + ": " + e.getMessage(), e);
        }
        if (!"monthly".equals(demo.backfill())) throw new IllegalArgumentException("models.json: backfill must be \"monthly\", was " + demo.backfill());
        if (!panels.panelExists(demo.panel())) {
            List<ReturnWriter.Row> rows = readReturns(dir.resolve("returns.csv.gz"));
            returns.upsert(demo.panel(), rows);
            LOG.info("demo: loaded {} returns into panel {} in {} ms", rows.size(), demo.panel(), (System.nanoTime() - t0) / 1_000_000);
        }
        List<LocalDate> dates = panels.dates(demo.panel());
        List<String> existing = models.list().stream().map(ModelView::name).toList();
        int made = 0;
        for (DemoModel m : demo.models()) {
            if (existing.contains(m.name())) continue;
            models.put(m.name(), m.spec());
            long t1 = System.nanoTime();
            List<FitView> done = fits.backfill(m.name(), monthEnds(dates, m.spec().windowDays()));
            made += done.size();
            LOG.info("demo: model {} backfilled with {} monthly fits in {} ms", m.name(), done.size(), (System.nanoTime() - t1) / 1_000_000);
        }
        LOG.info("demo ready in {} ms ({} fits made)", (System.nanoTime() - t0) / 1_000_000, made);
        return made;
    }

    /** The last date of each month in {@code dates} (ascending) that has at least {@code windowDays} dates up to it. */
    static List<LocalDate> monthEnds(List<LocalDate> dates, int windowDays) {
        List<LocalDate> out = new ArrayList<>();
        for (int i = windowDays - 1; i < dates.size(); i++) {
            LocalDate d = dates.get(i);
            boolean last = i == dates.size() - 1 || dates.get(i + 1).getMonthValue() != d.getMonthValue()
                    || dates.get(i + 1).getYear() != d.getYear();
            if (last) out.add(d);
        }
        return out;
    }

    private static List<ReturnWriter.Row> readReturns(Path file) {
        List<ReturnWriter.Row> rows = new ArrayList<>();
        try (BufferedReader in = new BufferedReader(new InputStreamReader(new GZIPInputStream(Files.newInputStream(file), 1 << 16),
                StandardCharsets.UTF_8))) {
            String header = in.readLine();
            if (header == null || !header.strip().equals("date,ticker,value")) {
                throw new IllegalArgumentException(file + ": header must be date,ticker,value, was " + header);
            }
            String line;
            long n = 1;
            while ((line = in.readLine()) != null) {
                n++;
                if (line.isBlank()) continue;
                String[] f = line.split(",", -1);
                if (f.length != 3) throw new IllegalArgumentException(file + " line " + n + ": expected 3 fields, found " + f.length);
                if (f[2].isEmpty()) continue;
                try {
                    rows.add(new ReturnWriter.Row(LocalDate.parse(f[0]), f[1], Double.parseDouble(f[2])));
                } catch (DateTimeParseException | NumberFormatException e) {
                    throw new IllegalArgumentException(file + " line " + n + ": " + e.getMessage(), e);
                }
            }
        } catch (IOException e) {
            throw new UncheckedIOException("cannot read " + file + ": " + e.getMessage(), e);
        }
        return rows;
    }
}
