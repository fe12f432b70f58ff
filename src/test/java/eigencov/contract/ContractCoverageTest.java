package eigencov.contract;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.node.ArrayNode;
import com.fasterxml.jackson.databind.node.ObjectNode;
import org.junit.jupiter.api.Test;

import java.io.IOException;
import java.nio.file.Files;
import java.util.List;
import java.util.Set;
import java.util.TreeSet;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * openapi/eigencov.yaml is a valid OpenAPI 3.1 document that documents every endpoint of the API
 * contract (docs/design.md section 4), each with a 2xx and the problem+json errors it can answer.
 * Every check is also shown to fail on a spoiled copy of the document.
 */
class ContractCoverageTest {
    /** docs/design.md section 4, "HTTP API v1": every endpoint it names. */
    private static final Set<String> CONTRACT = Set.of(
            "GET /health", "GET /ready", "GET /metrics", "GET /openapi.yaml",
            "POST /v1/panels/{panel}/returns", "GET /v1/panels/{panel}/returns", "GET /v1/panels", "GET /v1/panels/{panel}",
            "PUT /v1/models/{model}", "GET /v1/models", "GET /v1/models/{model}", "DELETE /v1/models/{model}",
            "POST /v1/models/{model}/fits", "GET /v1/models/{model}/fits", "GET /v1/models/{model}/fits/{id}",
            "POST /v1/models/{model}/covariance", "GET /v1/models/{model}/covariance",
            "POST /v1/models/{model}/exposures", "GET /v1/models/{model}/factors",
            "GET /v1/models/{model}/factor-returns", "POST /v1/models/{model}/risk",
            // docs/design.md section 6, serving additions
            "POST /v1/models/{model}/precision", "POST /v1/models/{model}/minimum-variance");

    /** docs/design.md section 6, "Jobs" and "Evaluation": every endpoint they name. */
    private static final Set<String> LONG_WORK = Set.of(
            "GET /v1/jobs", "GET /v1/jobs/{id}", "DELETE /v1/jobs/{id}",
            "POST /v1/evaluations", "GET /v1/evaluations", "GET /v1/evaluations/{id}", "GET /v1/evaluations/{id}/series");

    /** Documented beyond docs/design.md: GET form of exposures (as covariance has one). */
    private static final Set<String> EXTRA = Set.of("GET /v1/models/{model}/exposures");

    private static final SpecCheck CHECK = new SpecCheck();

    private static JsonNode spec() {
        try {
            return SpecCheck.YAML.readTree(Files.readString(OpenApiContract.SPEC));
        } catch (IOException e) {
            throw new java.io.UncheckedIOException(e);
        }
    }

    private static ObjectNode at(JsonNode doc, String pointer) {
        return (ObjectNode) doc.at(pointer);
    }

    @Test
    void documents_exactly_the_endpoints_of_the_contract() {
        Set<String> expected = new TreeSet<>(CONTRACT);
        expected.addAll(LONG_WORK);
        expected.addAll(EXTRA);
        assertEquals(expected, SpecCheck.operationKeys(spec()));
    }

    @Test
    void spec_has_the_structure_of_an_openapi_3_1_document() {
        assertEquals(List.of(), CHECK.structure(spec()));
    }

    @Test
    void every_schema_is_valid_json_schema_2020_12() {
        assertEquals(List.of(), CHECK.schemas(spec()));
    }

    @Test
    void every_ref_resolves() {
        assertEquals(List.of(), CHECK.refs(spec()));
    }

    @Test
    void every_operation_has_a_2xx_and_the_problem_responses_it_can_answer() {
        assertEquals(List.of(), CHECK.operations(spec()));
    }

    @Test
    void states_that_numbers_are_estimates_and_not_investment_advice() {
        String d = spec().path("info").path("description").asText();
        assertTrue(d.contains("estimate") && d.contains("not investment advice"), d);
    }

    // ------------------------------------------------------------ the checks can fail

    @Test
    void structure_check_rejects_an_openapi_3_0_version_and_an_optional_path_parameter() {
        JsonNode doc = spec().deepCopy();
        ((ObjectNode) doc).put("openapi", "3.0.3");
        at(doc, "/components/parameters/Model").put("required", false);
        List<String> problems = CHECK.structure(doc);
        assertTrue(problems.stream().anyMatch(p -> p.contains("openapi")), problems.toString());
        assertTrue(problems.stream().anyMatch(p -> p.contains("Model")), problems.toString());
    }

    @Test
    void structure_check_rejects_an_unknown_response_code_and_a_response_without_description() {
        JsonNode doc = spec().deepCopy();
        ObjectNode responses = at(doc, "/paths/~1health/get/responses");
        responses.set("2000", responses.get("200"));
        at(doc, "/paths/~1ready/get/responses/200").remove("description");
        List<String> problems = CHECK.structure(doc);
        assertTrue(problems.stream().anyMatch(p -> p.contains("2000")), problems.toString());
        assertTrue(problems.stream().anyMatch(p -> p.contains("description")), problems.toString());
    }

    @Test
    void schema_check_rejects_an_invalid_type_and_a_non_array_required() {
        JsonNode doc = spec().deepCopy();
        at(doc, "/components/schemas/Ticker").put("type", "strin");
        at(doc, "/components/schemas/FitRef").put("required", "id");
        List<String> problems = CHECK.schemas(doc);
        assertTrue(problems.stream().anyMatch(p -> p.startsWith("/components/schemas/Ticker")), problems.toString());
        assertTrue(problems.stream().anyMatch(p -> p.startsWith("/components/schemas/FitRef")), problems.toString());
    }

    @Test
    void ref_check_rejects_a_dangling_and_a_remote_ref() {
        JsonNode doc = spec().deepCopy();
        at(doc, "/components/schemas/IngestResult/properties/from").removeAll().put("$ref", "#/components/schemas/NoSuchThing");
        at(doc, "/components/schemas/IngestResult/properties/to").removeAll().put("$ref", "https://example.invalid/x.json");
        List<String> problems = CHECK.refs(doc);
        assertEquals(2, problems.size(), problems.toString());
    }

    @Test
    void operation_check_rejects_missing_success_error_and_header_declarations() {
        JsonNode doc = spec().deepCopy();
        at(doc, "/paths/~1v1~1models~1{model}/delete/responses").remove("204");
        at(doc, "/paths/~1v1~1panels/get/responses").remove("401");
        at(doc, "/paths/~1v1~1models~1{model}~1risk/post/responses").remove("422");
        at(doc, "/paths/~1health/get/responses/200/headers").remove("X-Request-Id");
        List<String> problems = CHECK.operations(doc);
        assertTrue(problems.contains("DELETE /v1/models/{model}: no 2xx response"), problems.toString());
        assertTrue(problems.contains("GET /v1/panels: does not declare 401"), problems.toString());
        assertTrue(problems.contains("POST /v1/models/{model}/risk: does not declare 422"), problems.toString());
        assertTrue(problems.contains("GET /health 200: no X-Request-Id header"), problems.toString());
    }

    @Test
    void operation_check_rejects_a_json_error_body_a_wrong_status_and_an_undeclared_path_parameter() {
        JsonNode doc = spec().deepCopy();
        ObjectNode content = at(doc, "/components/responses/NotFound/content");
        content.set("application/json", content.remove("application/problem+json"));
        ((ArrayNode) at(doc, "/components/schemas/Problem422").get("allOf")).remove(1);
        ((ArrayNode) at(doc, "/components/schemas/Problem422").get("allOf")).addObject().putObject("properties")
                .putObject("status").put("const", 500);
        ((ArrayNode) at(doc, "/paths/~1v1~1models~1{model}~1fits~1{id}").get("parameters")).remove(1);
        List<String> problems = CHECK.operations(doc);
        assertTrue(problems.contains("GET /v1/panels/{panel} 404: content must be application/problem+json only"), problems.toString());
        assertTrue(problems.contains("PUT /v1/models/{model} 422: schema fixes status 500"), problems.toString());
        assertTrue(problems.stream().anyMatch(p -> p.startsWith("GET /v1/models/{model}/fits/{id}: path parameters declared [model]")),
                problems.toString());
    }

    @Test
    void coverage_check_notices_a_contract_endpoint_left_out() {
        JsonNode doc = spec().deepCopy();
        at(doc, "/paths").remove("/v1/models/{model}/factors");
        assertTrue(!SpecCheck.operationKeys(doc).containsAll(CONTRACT));
    }
}
