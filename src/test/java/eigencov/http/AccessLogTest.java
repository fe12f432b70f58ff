package eigencov.http;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

import java.util.HashSet;
import java.util.Set;
import java.util.UUID;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

class AccessLogTest {

    /** Threshold 250 ms: successful requests in time go to DEBUG, refused or slow ones to INFO, failures to WARN. */
    @ParameterizedTest
    @CsvSource({
            "200, 3, DEBUG",
            "304, 1, DEBUG",
            "201, 249, DEBUG",
            "200, 250, INFO",
            "200, 4000, INFO",
            "400, 1, INFO",
            "404, 1, INFO",
            "422, 900, INFO",
            "500, 1, WARN",
            "503, 2, WARN",
            "503, 9000, WARN"})
    void level_follows_status_and_duration(int status, long ms, AccessLog.Level expected) {
        assertEquals(expected, new AccessLog(250).level(status, ms * 1_000_000L));
    }

    @Test
    void threshold_must_be_positive() {
        assertThrows(IllegalArgumentException.class, () -> new AccessLog(0));
    }

    @Test
    void request_ids_are_version_4_uuids_and_distinct() {
        Set<String> seen = new HashSet<>();
        for (int i = 0; i < 10_000; i++) {
            String id = HttpApi.newRequestId();
            UUID u = UUID.fromString(id);
            assertEquals(4, u.version(), id);
            assertEquals(2, u.variant(), id);
            assertEquals(id, u.toString());
            seen.add(id);
        }
        assertEquals(10_000, seen.size());
    }
}
