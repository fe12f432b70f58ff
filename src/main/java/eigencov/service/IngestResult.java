package eigencov.service;

import java.time.LocalDate;

/**
 * Outcome of one returns upload: data rows received, rows newly inserted, rows whose
 * (date, ticker) existed and got the new value, distinct tickers, and the date range of the upload
 * ({@code null} when it held no rows). A (date, ticker) repeated with the identical value counts
 * once in received and once in inserted/updated, so {@code inserted + updated <= received}.
 */
public record IngestResult(long received, long inserted, long updated, int tickers, LocalDate from, LocalDate to) {
}
