package eigencov.testsupport;

import eigencov.app.AppConfig;
import org.junit.jupiter.api.extension.ConditionEvaluationResult;
import org.junit.jupiter.api.extension.ExecutionCondition;
import org.junit.jupiter.api.extension.ExtensionConfigurationException;
import org.junit.jupiter.api.extension.ExtensionContext;

/**
 * Guards the PostgreSQL test run (registered for every test through
 * {@code META-INF/services/org.junit.jupiter.api.extension.Extension} and extension
 * auto-detection in pom.xml). On the H2 run it does nothing. On the PostgreSQL run it probes the
 * server once: reachable, every test runs; unreachable under CI ({@code CI=true}), every test
 * fails with the reason; unreachable elsewhere, the whole run is skipped with one clear message
 * on stderr, so a laptop without PostgreSQL still gets a green H2 run.
 */
public final class PostgresAvailableCondition implements ExecutionCondition {
    private static final ExtensionContext.Namespace NS = ExtensionContext.Namespace.create(PostgresAvailableCondition.class);

    @Override
    public ConditionEvaluationResult evaluateExecutionCondition(ExtensionContext context) {
        if (!"postgresql".equals(System.getProperty(AppConfig.TEST_STORE_PROPERTY))) {
            return ConditionEvaluationResult.enabled("H2 run");
        }
        Probe probe = context.getRoot().getStore(NS).computeIfAbsent(Probe.class, k -> Probe.run(), Probe.class);
        if (probe.reason == null) return ConditionEvaluationResult.enabled("PostgreSQL at " + probe.url + " answers");
        String message = "PostgreSQL test run: no server answers at " + probe.url + " (" + probe.reason
                + "); set EIGENCOV_TEST_PG_URL or start PostgreSQL (.ci/run does)";
        if ("true".equalsIgnoreCase(System.getenv("CI"))) {
            throw new ExtensionConfigurationException("CI=true: " + message);
        }
        if (context.getRoot().getStore(NS).get("reported") == null) {
            context.getRoot().getStore(NS).put("reported", Boolean.TRUE);
            System.err.println("SKIPPING " + message);
        }
        return ConditionEvaluationResult.disabled("skipped: " + message);
    }

    /** The outcome of one connection attempt; reason null when it worked. */
    private record Probe(String url, String reason) {
        static Probe run() {
            PostgresTestStore.Settings s = PostgresTestStore.Settings.fromEnv();
            return new Probe(s.url(), s.unreachableReason());
        }
    }
}
