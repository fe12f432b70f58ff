package eigencov.contract;

import org.junit.jupiter.api.Test;

import java.util.List;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

/** The contract checker itself must be able to fail: feed it responses that break the spec. */
class OpenApiContractTest {
    private final OpenApiContract contract = OpenApiContract.get();

    @Test
    void accepts_a_conforming_problem() {
        List<String> v = contract.checkResponse("GET", "/ready", 503, "application/problem+json",
                "{\"type\":\"/problems/not-ready\",\"title\":\"Not ready\",\"status\":503,\"detail\":\"x\"}");
        assertEquals(List.of(), v);
    }

    @Test
    void rejects_a_problem_missing_required_fields() {
        List<String> v = contract.checkResponse("GET", "/ready", 503, "application/problem+json", "{\"title\":\"x\"}");
        assertFalse(v.isEmpty());
    }

    @Test
    void rejects_an_undeclared_status_and_media_type_and_path() {
        assertFalse(contract.checkResponse("GET", "/health", 418, "application/json", "{}").isEmpty());
        assertFalse(contract.checkResponse("GET", "/health", 200, "text/plain", "up").isEmpty());
        assertFalse(contract.checkResponse("GET", "/undocumented", 200, "application/json", "{}").isEmpty());
    }

    @Test
    void rejects_a_wrong_value_inside_a_declared_body() {
        assertFalse(contract.checkResponse("GET", "/health", 200, "application/json", "{\"status\":\"down\"}").isEmpty());
        assertTrue(contract.checkResponse("GET", "/health", 200, "application/json", "{\"status\":\"up\"}").isEmpty());
    }

    @Test
    void rejects_a_response_without_a_required_header() {
        assertFalse(contract.checkHeaders("GET", "/health", 200, java.util.Set.of("Content-Type")).isEmpty());
        assertTrue(contract.checkHeaders("GET", "/health", 200, java.util.Set.of("x-request-id")).isEmpty());
    }

    @Test
    void unknown_routes_must_still_answer_problem_json() {
        assertFalse(contract.checkResponse("GET", "/nope", 404, "text/html", "<html>").isEmpty());
        assertTrue(contract.checkResponse("GET", "/nope", 404, "application/problem+json",
                "{\"type\":\"/problems/not-found\",\"title\":\"Not found\",\"status\":404,\"detail\":\"no\"}").isEmpty());
    }
}
