package eigencov.service;

import com.fasterxml.jackson.annotation.JsonInclude;
import com.fasterxml.jackson.annotation.JsonUnwrapped;

import java.time.Instant;
import java.time.LocalDate;

/**
 * A model as the API shows it: its name, the stored spec's fields inline, the spec version, and the
 * newest fit ({@code latestFit}, null before the first fit).
 */
public record ModelView(String name, @JsonUnwrapped ModelSpec spec, int version, Instant createdAt, Instant updatedAt,
                        @JsonInclude(JsonInclude.Include.ALWAYS) LatestFit latestFit) {

    /** The newest ok fit of the model. */
    public record LatestFit(long id, LocalDate asOf, Instant createdAt) {
    }
}
