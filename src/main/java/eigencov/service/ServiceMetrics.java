package eigencov.service;

/**
 * What services report for monitoring; implemented over Micrometer by {@code eigencov.app.Metrics}
 * (served on {@code GET /metrics}). Services see only these events, never meter names.
 */
public interface ServiceMetrics {
    /** Reports nothing (tests, tools). */
    ServiceMetrics NONE = new ServiceMetrics() {
        @Override
        public void rowsIngested(String panel, long rows) {
        }

        @Override
        public void fitCompleted(String model, long durationMs) {
        }

        @Override
        public void fitFailed(String model, String reason) {
        }

        @Override
        public void refitClaim(String model, boolean won) {
        }
    };

    /** Rows stored by a committed ingest (inserted plus updated). */
    void rowsIngested(String panel, long rows);

    /** A fit stored completely; {@code durationMs} from loading the window to the stored fit. */
    void fitCompleted(String model, long durationMs);

    /** A fit that did not complete; {@code reason} a short category ({@code insufficient-data}, {@code store}, ...). */
    void fitFailed(String model, String reason);

    /** A due scheduled refit that this instance claimed ({@code won}) or found claimed by another instance. */
    void refitClaim(String model, boolean won);
}
