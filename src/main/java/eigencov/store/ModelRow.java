package eigencov.store;

import java.time.Instant;

/**
 * One stored model spec.
 *
 * @param specJson          the spec as the API echoes it
 * @param version           1 on create, +1 on every replace
 * @param refitEverySeconds scheduled refit period, null = none
 * @param lastRefitAt       start of the last scheduled refit (scheduler bookkeeping), null = never
 */
public record ModelRow(long id, String name, String panel, String specJson, int version, Long refitEverySeconds,
                       boolean refitOnIngest, Instant createdAt, Instant updatedAt, Instant lastRefitAt) {
}
