package eigencov.store;

import java.time.LocalDate;

/**
 * What a panel holds: distinct tickers, distinct dates, rows, and the first and last date
 * ({@code null} while the panel is empty).
 */
public record PanelSummary(String name, long tickers, long dates, long rows, LocalDate from, LocalDate to) {
}
