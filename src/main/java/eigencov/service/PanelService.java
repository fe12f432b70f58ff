package eigencov.service;

import eigencov.service.InvalidInputException.Issue;
import eigencov.store.PanelStore;
import eigencov.store.PanelSummary;
import eigencov.store.ReturnBatch;
import eigencov.store.ReturnSink;
import eigencov.store.UpsertCounts;

import java.io.IOException;
import java.io.InputStream;
import java.io.UncheckedIOException;
import java.time.LocalDate;
import java.util.ArrayList;
import java.util.List;

/**
 * Return panels: ingest of uploads (validated in full before anything is stored, then upserted in
 * one transaction), summaries and read-back. The HTTP handlers and the demo loader both ingest
 * through {@link #ingest}.
 */
public final class PanelService {
    /** Panel (and model) names: {@code [A-Za-z0-9._-]{1,64}} (docs/design.md section 3). */
    public static final int MAX_NAME_LENGTH = 64;
    /** Most tickers one read-back may filter on. */
    static final int MAX_FILTER_TICKERS = 5_000;

    private final PanelStore store;
    private final double maxAbsReturn;
    private final IngestListener listener;
    private final ServiceMetrics metrics;

    /**
     * @param maxAbsReturn largest accepted |return| (a simple return; 10 = +1000 %)
     */
    public PanelService(PanelStore store, double maxAbsReturn) {
        this(store, maxAbsReturn, (panel, before, after) -> { });
    }

    /**
     * @param maxAbsReturn largest accepted |return| (a simple return; 10 = +1000 %)
     * @param listener     told after each committed upload (fits that follow an ingest)
     */
    public PanelService(PanelStore store, double maxAbsReturn, IngestListener listener) {
        this(store, maxAbsReturn, listener, ServiceMetrics.NONE);
    }

    /**
     * @param maxAbsReturn largest accepted |return| (a simple return; 10 = +1000 %)
     * @param listener     told after each committed upload (fits that follow an ingest)
     * @param metrics      told the rows each committed upload stored
     */
    public PanelService(PanelStore store, double maxAbsReturn, IngestListener listener, ServiceMetrics metrics) {
        if (!(maxAbsReturn > 0) || Double.isInfinite(maxAbsReturn)) {
            throw new IllegalArgumentException("maxAbsReturn must be a positive finite number, was " + maxAbsReturn);
        }
        this.store = store;
        this.maxAbsReturn = maxAbsReturn;
        this.listener = listener;
        this.metrics = metrics;
    }

    /**
     * Reads a whole upload, validates every row, and upserts the rows on (date, ticker) in one
     * transaction, creating the panel if absent. Nothing is stored when any row is invalid.
     *
     * @throws InvalidInputException listing up to 100 located problems (row, field)
     */
    public IngestResult ingest(String panel, ReturnsFormat format, InputStream body) {
        checkName("panel", panel);
        ReturnBatchBuilder builder = new ReturnBatchBuilder(maxAbsReturn);
        try {
            switch (format) {
                case JSON -> JsonReturnsReader.read(body, builder);
                case CSV -> CsvReturnsReader.read(body, builder);
            }
        } catch (IOException e) {
            throw new InvalidInputException("the request body could not be read: " + e.getMessage(),
                    List.of(new Issue(null, "body", "could not be read to the end")));
        }
        ReturnBatch batch = builder.build();
        LocalDate lastBefore = store.panel(panel).map(PanelSummary::to).orElse(null);
        UpsertCounts counts = store.upsert(panel, batch);
        metrics.rowsIngested(panel, counts.inserted() + counts.updated());
        List<LocalDate> dates = batch.dates();
        if (!dates.isEmpty()) {
            LocalDate batchLast = dates.get(dates.size() - 1);
            listener.afterIngest(panel, lastBefore, lastBefore == null || batchLast.isAfter(lastBefore) ? batchLast : lastBefore);
        }
        return new IngestResult(builder.received(), counts.inserted(), counts.updated(), batch.tickers().size(),
                dates.isEmpty() ? null : dates.get(0), dates.isEmpty() ? null : dates.get(dates.size() - 1));
    }

    /** Every panel with its counts and date range, by name. */
    public List<PanelSummary> panels() {
        return store.panels();
    }

    /** @throws NotFoundException when the panel does not exist */
    public PanelSummary panel(String name) {
        checkName("panel", name);
        return store.panel(name).orElseThrow(() -> new NotFoundException("panel", name));
    }

    /**
     * Streams the panel's returns to {@code sink} in (date, ticker) order.
     *
     * @param tickers comma-separated symbols to keep, or null/blank for all
     * @param from    first date (inclusive) or null
     * @param to      last date (inclusive) or null
     * @throws InvalidInputException before anything is streamed, when a parameter is invalid
     * @throws NotFoundException     before anything is streamed, when the panel does not exist
     */
    public void readReturns(String panel, String tickers, LocalDate from, LocalDate to, ReturnSink sink) {
        checkName("panel", panel);
        List<String> filter = new ArrayList<>();
        List<Issue> issues = new ArrayList<>();
        if (tickers != null && !tickers.isBlank()) {
            for (String s : tickers.split(",", -1)) {
                String t = s.strip();
                String problem = ReturnBatchBuilder.tickerProblem(t);
                if (problem != null) issues.add(new Issue(null, "tickers", problem));
                else filter.add(t);
            }
            if (filter.size() > MAX_FILTER_TICKERS) issues.add(new Issue(null, "tickers", "at most " + MAX_FILTER_TICKERS + " tickers"));
        }
        if (from != null && to != null && from.isAfter(to)) issues.add(new Issue(null, "from", "must not be after to (" + to + "), was " + from));
        if (!issues.isEmpty()) throw new InvalidInputException(issues.get(0).field() + ": " + issues.get(0).message(), issues);
        try {
            store.readReturns(panel, filter, from, to, sink);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    /**
     * Checks a panel or model name against {@code [A-Za-z0-9._-]{1,64}}.
     *
     * @throws InvalidInputException naming {@code field} when it does not match
     */
    public static String checkName(String field, String name) {
        String problem = null;
        if (name == null || name.isEmpty()) {
            problem = "must not be empty";
        } else if (name.length() > MAX_NAME_LENGTH) {
            problem = "must be at most " + MAX_NAME_LENGTH + " characters, was " + name.length();
        } else {
            for (int i = 0; i < name.length() && problem == null; i++) {
                char ch = name.charAt(i);
                boolean ok = (ch >= 'A' && ch <= 'Z') || (ch >= 'a' && ch <= 'z') || (ch >= '0' && ch <= '9') || ch == '.' || ch == '_' || ch == '-';
                if (!ok) problem = "must match [A-Za-z0-9._-]{1,64}; '" + ch + "' at position " + (i + 1) + " is not allowed";
            }
        }
        if (problem != null) throw InvalidInputException.field(field, problem);
        return name;
    }
}
