package eigencov.app;

import org.junit.jupiter.api.Test;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

class MetricsTest {

    @Test
    void ingest_and_fit_events_appear_as_prometheus_series() {
        try (Metrics m = new Metrics()) {
            m.rowsIngested("daily", 1_000);
            m.rowsIngested("daily", 500);
            m.fitCompleted("us-1y", 1_200);
            m.fitFailed("us-1y", "too-few-dates");
            m.fitFailed("us-1y", "java.sql.SQLException: connection refused at host 10.0.0.1");
            m.refitClaim("us-1y", false);
            String text = m.scrape();
            assertTrue(text.contains("eigencov_rows_ingested_total{panel=\"daily\"} 1500.0"), text);
            assertTrue(text.contains("eigencov_fit_duration_seconds_count{model=\"us-1y\"} 1"), text);
            assertTrue(text.contains("eigencov_fit_duration_seconds_bucket{model=\"us-1y\",le=\"2.5\"} 1"), text);
            assertTrue(text.contains("eigencov_fit_duration_seconds_bucket{model=\"us-1y\",le=\"1.0\"} 0"), text);
            assertTrue(text.contains("eigencov_fit_failures_total{model=\"us-1y\",reason=\"too-few-dates\"} 1.0"), text);
            assertTrue(text.contains("eigencov_fit_failures_total{model=\"us-1y\",reason=\"other\"} 1.0"), "free text folds to other: " + text);
            assertTrue(text.contains("eigencov_refit_claims_total{model=\"us-1y\",outcome=\"taken\"} 1.0"), text);
        }
    }

    @Test
    void rejects_negative_counts_and_durations() {
        try (Metrics m = new Metrics()) {
            assertEquals("rows must not be negative, was -1",
                    assertThrows(IllegalArgumentException.class, () -> m.rowsIngested("p", -1)).getMessage());
            assertThrows(IllegalArgumentException.class, () -> m.fitCompleted("m", -5));
        }
    }
}
