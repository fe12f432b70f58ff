package eigencov.store;

import eigencov.app.AppConfig;

/**
 * Opens the store a store test runs on: whatever {@link AppConfig#forTest(String)} gives, so the
 * store tests run on H2 in memory in the first pass of {@code mvn verify} and on a fresh
 * PostgreSQL schema in the second.
 */
final class TestStores {
    private TestStores() {
    }

    static Database open(String name) {
        return Database.open(AppConfig.forTest(name).dbUrl(), "", "", 4);
    }
}
