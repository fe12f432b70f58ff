package eigencov.app;

import java.util.ServiceLoader;

/**
 * Where {@link AppConfig#forTest(String)} puts a test app's database when a test run asks for a
 * store other than in-memory H2 (system property {@value AppConfig#TEST_STORE_PROPERTY}, e.g.
 * {@code postgresql}). Implementations live in test sources and are found with
 * {@link ServiceLoader}, so production code carries no database administration.
 */
public interface TestStore {

    /** The value of {@value AppConfig#TEST_STORE_PROPERTY} this store answers to. */
    String name();

    /**
     * A JDBC URL (credentials included) of a fresh, empty database or schema for one test app.
     *
     * @param databaseName the name the test gave; used only to make the store readable when debugging
     */
    String freshJdbcUrl(String databaseName);

    /** The store named {@code name} on the class path, or an exception naming the ones found. */
    static TestStore named(String name) {
        StringBuilder found = new StringBuilder();
        for (TestStore s : ServiceLoader.load(TestStore.class)) {
            if (s.name().equals(name)) return s;
            found.append(found.length() == 0 ? "" : ", ").append(s.name());
        }
        throw new IllegalStateException(AppConfig.TEST_STORE_PROPERTY + "=" + name
                + " but no such test store is on the class path (found: " + (found.length() == 0 ? "none" : found) + ")");
    }
}
