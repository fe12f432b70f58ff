package eigencov.service;

import java.time.LocalDate;

/**
 * Told by the ingest service after a batch of returns has been committed. Implementations must
 * return quickly (hand work to a background executor) and never throw into the ingest.
 */
public interface IngestListener {
    /**
     * @param panel        the panel written
     * @param lastDateBefore the panel's last date before the batch (null for a new panel)
     * @param lastDateAfter  the panel's last date after the batch
     */
    void afterIngest(String panel, LocalDate lastDateBefore, LocalDate lastDateAfter);
}
