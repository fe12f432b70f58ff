package eigencov.service;

import java.time.Instant;
import java.time.LocalDate;

/** Names the fit an answer came from; every query response carries it as {@code "fit"}. */
public record FitRef(long id, String model, LocalDate asOf, Instant createdAt) {
    public FitRef {
        if (model == null || asOf == null || createdAt == null) throw new IllegalArgumentException("fit reference needs model, asOf and createdAt");
    }
}
