package eigencov.contract;

import io.restassured.RestAssured;
import org.junit.jupiter.api.extension.BeforeAllCallback;
import org.junit.jupiter.api.extension.ExtensionContext;

/**
 * Auto-registered JUnit extension (META-INF/services + junit-platform.properties) that installs
 * {@link ContractFilter} into rest-assured before any test class runs, so no HTTP test can skip
 * the contract check.
 */
public final class ContractExtension implements BeforeAllCallback {
    @Override
    public void beforeAll(ExtensionContext context) {
        synchronized (RestAssured.class) {
            if (!RestAssured.filters().contains(ContractFilter.INSTANCE)) RestAssured.filters(ContractFilter.INSTANCE);
        }
    }
}
