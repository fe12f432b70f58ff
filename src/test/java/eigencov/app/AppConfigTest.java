package eigencov.app;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

import java.util.List;
import java.util.Map;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

class AppConfigTest {

    @Test
    void flags_override_environment_and_defaults_fill_the_rest() {
        AppConfig c = AppConfig.fromArgs(List.of("--port", "9001", "--demo"),
                Map.of("EIGENCOV_PORT", "7000", "EIGENCOV_DB_URL", "jdbc:h2:mem:x", "PATH", "/bin"));
        assertEquals(9001, c.port());
        assertEquals("jdbc:h2:mem:x", c.dbUrl());
        assertTrue(c.demo());
        assertEquals(AppConfig.DEFAULT_MAX_ABS_RETURN, c.maxAbsReturn());
    }

    @Test
    void slow_request_threshold_comes_from_flag_or_environment() {
        assertEquals(AppConfig.DEFAULT_SLOW_REQUEST_MS, AppConfig.fromArgs(List.of(), Map.of()).slowRequestMs());
        assertEquals(250, AppConfig.fromArgs(List.of(), Map.of("EIGENCOV_SLOW_REQUEST_MS", "250")).slowRequestMs());
        assertEquals(40, AppConfig.fromArgs(List.of("--slow-request-ms", "40"), Map.of("EIGENCOV_SLOW_REQUEST_MS", "250")).slowRequestMs());
    }

    @Test
    void without_keys_binds_loopback_and_with_keys_all_interfaces() {
        assertEquals("127.0.0.1", AppConfig.defaults().bindHost());
        assertEquals("0.0.0.0", AppConfig.defaults().withApiKeys("read:abc").bindHost());
    }

    @Test
    void describe_masks_secrets() {
        AppConfig c = AppConfig.fromArgs(List.of("--db", "jdbc:postgresql://h/db?password=hunter2", "--db-password", "pw"),
                Map.of("EIGENCOV_API_KEYS", "read:topsecret,write:alsosecret"));
        String text = c.describe().toString();
        assertFalse(text.contains("hunter2"), text);
        assertFalse(text.contains("topsecret"), text);
        assertFalse(text.contains("alsosecret"), text);
        assertFalse(text.contains("=pw"), text);
    }

    @ParameterizedTest
    @CsvSource(delimiter = '|', value = {
            "--port|70000|port must be between 0 and 65535",
            "--port|abc|port must be a whole number",
            "--db|mysql://x|db URL must start with jdbc:",
            "--max-abs-return|-1|maxAbsReturn must be a positive finite number",
            "--db-pool-size|0|dbPoolSize must be between 1 and 200",
            "--slow-request-ms|0|slowRequestMs must be at least 1",
            "--colour|red|unknown flag --colour"})
    void rejects_bad_settings_naming_the_key(String flag, String value, String expected) {
        var e = assertThrows(AppConfig.ConfigException.class, () -> AppConfig.fromArgs(List.of(flag, value), Map.of()));
        assertTrue(e.getMessage().startsWith(expected), e.getMessage());
    }
}
