package eigencov.store;

import java.time.Instant;
import java.time.LocalDate;

/**
 * The bookkeeping of one fit attempt (table {@code fit}). For a failed attempt ({@code status}
 * {@link #FAILED}) the figures of the model are null and {@code reason} says why.
 *
 * @param origin what started it: {@code request}, {@code backfill}, {@code schedule}, {@code ingest}
 */
public record FitRow(long id, String model, String status, String origin, LocalDate asOf, Instant createdAt,
                     int specVersion, String specJson, String reason, Integer factors, Integer tickers, Integer dates,
                     LocalDate windowFrom, LocalDate windowTo, Long loadMs, Long computeMs, Long storeMs) {
    public static final String OK = "ok";
    public static final String FAILED = "failed";

    public boolean ok() {
        return OK.equals(status);
    }
}
