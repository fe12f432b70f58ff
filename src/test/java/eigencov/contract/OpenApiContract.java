package eigencov.contract;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.dataformat.yaml.YAMLFactory;
import com.networknt.schema.Error;
import com.networknt.schema.InputFormat;
import com.networknt.schema.Schema;
import com.networknt.schema.SchemaLocation;
import com.networknt.schema.SchemaRegistry;
import com.networknt.schema.SpecificationVersion;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Iterator;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.concurrent.ConcurrentHashMap;
import java.util.regex.Pattern;

/**
 * The API contract in {@code openapi/eigencov.yaml} (OpenAPI 3.1), checked against real traffic.
 * Operation lookup (path template, method, status, media type) is ours; the schema check is done by
 * networknt's JSON Schema 2020-12 validator, with {@code $ref}s resolved inside the spec document.
 */
final class OpenApiContract {
    static final Path SPEC = Path.of("openapi", "eigencov.yaml");
    private static final String DOC_IRI = "https://eigencov.invalid/openapi.json";

    private static volatile OpenApiContract instance;

    private final JsonNode spec;
    private final SchemaRegistry registry;
    private final List<PathTemplate> templates = new ArrayList<>();
    private final Map<String, Schema> schemas = new ConcurrentHashMap<>();

    private record PathTemplate(String template, Pattern regex) {
    }

    private OpenApiContract(JsonNode spec) {
        this.spec = spec;
        String json = spec.toString();
        this.registry = SchemaRegistry.withDefaultDialect(SpecificationVersion.DRAFT_2020_12,
                b -> b.schemas(Map.of(DOC_IRI, json)));
        for (Iterator<String> it = spec.path("paths").fieldNames(); it.hasNext(); ) {
            String t = it.next();
            String rx = Pattern.quote(t).replaceAll("\\{[^}/]+\\}", "\\\\E[^/]+\\\\Q");
            templates.add(new PathTemplate(t, Pattern.compile("^" + rx + "$")));
        }
        // Literal segments win over parameters (e.g. /fits/latest before /fits/{id}).
        templates.sort((a, b) -> Long.compare(b.template().chars().filter(c -> c == '{').count() == 0 ? 1 : 0,
                a.template().chars().filter(c -> c == '{').count() == 0 ? 1 : 0));
    }

    static OpenApiContract get() {
        OpenApiContract c = instance;
        if (c == null) {
            synchronized (OpenApiContract.class) {
                if (instance == null) {
                    try {
                        instance = new OpenApiContract(new ObjectMapper(new YAMLFactory()).readTree(Files.readString(SPEC)));
                    } catch (IOException e) {
                        throw new UncheckedIOException("cannot read " + SPEC.toAbsolutePath(), e);
                    }
                }
                c = instance;
            }
        }
        return c;
    }

    JsonNode spec() {
        return spec;
    }

    /** The spec's path template for a concrete path, or null. */
    String templateFor(String path) {
        for (PathTemplate t : templates) if (t.regex().matcher(path).matches()) return t.template();
        return null;
    }

    /**
     * Checks one exchange. Returns the list of contract violations (empty = conforms).
     *
     * @param body response body text (JSON media types are schema-checked; others only declared)
     */
    List<String> checkResponse(String method, String path, int status, String contentType, String body) {
        List<String> out = new ArrayList<>();
        String template = templateFor(path);
        String where = method + " " + path + " -> " + status;
        if (template == null) {
            if (status == 404 || status == 405) return checkUndocumented(where, contentType, body);
            out.add(where + ": path is not in " + SPEC);
            return out;
        }
        JsonNode op = spec.path("paths").path(template).path(method.toLowerCase(Locale.ROOT));
        if (op.isMissingNode()) {
            if (status == 404 || status == 405) return checkUndocumented(where, contentType, body);
            out.add(where + ": method not declared for " + template);
            return out;
        }
        String code = Integer.toString(status);
        String responsePointer = "/paths/" + escape(template) + "/" + method.toLowerCase(Locale.ROOT) + "/responses/";
        JsonNode response = op.path("responses").path(code);
        if (response.isMissingNode()) {
            response = op.path("responses").path(code.charAt(0) + "XX");
            responsePointer += code.charAt(0) + "XX";
        } else {
            responsePointer += code;
        }
        if (response.isMissingNode()) {
            response = op.path("responses").path("default");
            responsePointer = responsePointer.substring(0, responsePointer.lastIndexOf('/') + 1) + "default";
        }
        if (response.isMissingNode()) {
            out.add(where + ": status " + status + " not declared for " + method + " " + template);
            return out;
        }
        while (response.has("$ref")) {
            responsePointer = response.get("$ref").asText().substring(1);
            response = spec.at(responsePointer);
        }
        if (status == 304 || status == 204) return out;
        String media = contentType == null ? "" : contentType.split(";")[0].trim().toLowerCase(Locale.ROOT);
        JsonNode content = response.path("content");
        if (content.isMissingNode() || content.size() == 0) {
            if (body != null && !body.isEmpty()) out.add(where + ": body of type " + media + " but the spec declares no content");
            return out;
        }
        if (!content.has(media)) {
            out.add(where + ": media type '" + media + "' not declared (declared: " + names(content) + ")");
            return out;
        }
        if (isBinary(media) && contentType.toLowerCase(Locale.ROOT).contains("charset")) {
            out.add(where + ": binary media type '" + media + "' with a charset parameter ('" + contentType + "')");
        }
        if (isJson(media)) {
            String pointer = responsePointer + "/content/" + escape(media) + "/schema";
            out.addAll(validate(where, pointer, body));
        }
        return out;
    }

    /**
     * The headers the spec marks {@code required: true} for this response that the response lacks.
     *
     * @param present response header names, any case
     */
    List<String> checkHeaders(String method, String path, int status, java.util.Set<String> present) {
        String template = templateFor(path);
        if (template == null) return List.of();
        JsonNode responses = spec.path("paths").path(template).path(method.toLowerCase(Locale.ROOT)).path("responses");
        JsonNode response = responses.path(Integer.toString(status));
        while (response.has("$ref")) response = spec.at(response.get("$ref").asText().substring(1));
        java.util.Set<String> have = new java.util.HashSet<>();
        for (String h : present) have.add(h.toLowerCase(Locale.ROOT));
        List<String> out = new ArrayList<>();
        for (Iterator<Map.Entry<String, JsonNode>> it = response.path("headers").fields(); it.hasNext(); ) {
            Map.Entry<String, JsonNode> h = it.next();
            JsonNode header = h.getValue();
            while (header.has("$ref")) header = spec.at(header.get("$ref").asText().substring(1));
            if (header.path("required").asBoolean(false) && !have.contains(h.getKey().toLowerCase(Locale.ROOT))) {
                out.add(method + " " + path + " -> " + status + ": required header " + h.getKey() + " missing");
            }
        }
        return out;
    }

    /** Media types whose bodies are bytes, not text: a charset parameter on them is meaningless. */
    private static boolean isBinary(String media) {
        return media.equals("application/x-npy") || media.equals("application/octet-stream");
    }

    /** Checks a request body that the server accepted (2xx) against the operation's requestBody schema. */
    List<String> checkRequest(String method, String path, String contentType, String body) {
        String template = templateFor(path);
        if (template == null || body == null || body.isEmpty()) return List.of();
        String m = method.toLowerCase(Locale.ROOT);
        JsonNode rb = spec.path("paths").path(template).path(m).path("requestBody");
        if (rb.isMissingNode()) return List.of(method + " " + path + ": a body was sent and accepted but the spec declares no requestBody");
        String pointer = "/paths/" + escape(template) + "/" + m + "/requestBody";
        while (rb.has("$ref")) {
            pointer = rb.get("$ref").asText().substring(1);
            rb = spec.at(pointer);
        }
        String media = contentType == null ? "application/json" : contentType.split(";")[0].trim().toLowerCase(Locale.ROOT);
        if (!rb.path("content").has(media)) return List.of(method + " " + path + ": request media type '" + media + "' accepted but not declared");
        if (!isJson(media)) return List.of();
        return validate(method + " " + path + " request", pointer + "/content/" + escape(media) + "/schema", body);
    }

    private List<String> checkUndocumented(String where, String contentType, String body) {
        // An unknown route or method must still answer with a problem+json body.
        String media = contentType == null ? "" : contentType.split(";")[0].trim();
        if (!media.equals("application/problem+json")) return List.of(where + ": expected application/problem+json, got " + media);
        return validate(where, "/components/schemas/Problem", body);
    }

    private List<String> validate(String where, String pointer, String body) {
        Schema schema = schemas.computeIfAbsent(pointer, p -> registry.getSchema(SchemaLocation.of(DOC_IRI + "#" + p)));
        List<Error> errors = schema.validate(body == null || body.isEmpty() ? "null" : body, InputFormat.JSON);
        List<String> out = new ArrayList<>();
        for (Error e : errors) out.add(where + ": " + e.getInstanceLocation() + " " + e.getMessage());
        return out;
    }

    private static boolean isJson(String media) {
        return media.equals("application/json") || media.endsWith("+json");
    }

    private static String names(JsonNode n) {
        List<String> l = new ArrayList<>();
        n.fieldNames().forEachRemaining(l::add);
        return String.join(", ", l);
    }

    static String escape(String s) {
        return s.replace("~", "~0").replace("/", "~1");
    }
}
