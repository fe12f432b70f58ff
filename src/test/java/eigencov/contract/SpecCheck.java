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
import java.io.InputStream;
import java.io.UncheckedIOException;
import java.util.ArrayList;
import java.util.Iterator;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Set;
import java.util.TreeSet;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

/**
 * Static checks of an OpenAPI 3.1 document (no traffic involved): its structure, every Schema
 * Object against the JSON Schema 2020-12 meta-schema, every {@code $ref}, and our own rules for
 * operations (a 2xx, problem+json for every error, the error statuses an operation of its kind
 * can answer, X-Request-Id on every response). Each check returns the problems found; empty
 * means the document passes.
 */
final class SpecCheck {
    static final ObjectMapper YAML = new ObjectMapper(new YAMLFactory());
    private static final String STRUCTURE = "contract/openapi-3.1-structure.schema.yaml";
    private static final String STRUCTURE_IRI = "https://eigencov.invalid/openapi-3.1-structure.json";
    private static final String META_2020_12 = "https://json-schema.org/draft/2020-12/schema";
    private static final Set<String> METHODS = Set.of("get", "put", "post", "delete", "options", "head", "patch", "trace");
    private static final Pattern TEMPLATE_PARAM = Pattern.compile("\\{([^}/]+)}");
    private static final String PROBLEM = "application/problem+json";
    private static final String PROBLEM_REF = "#/components/schemas/Problem";

    private final SchemaRegistry registry;

    SpecCheck() {
        String structure;
        try (InputStream in = SpecCheck.class.getClassLoader().getResourceAsStream(STRUCTURE)) {
            if (in == null) throw new IllegalStateException("missing test resource " + STRUCTURE);
            structure = YAML.readTree(in).toString();
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
        registry = SchemaRegistry.withDefaultDialect(SpecificationVersion.DRAFT_2020_12,
                b -> b.schemas(Map.of(STRUCTURE_IRI, structure)));
    }

    /** The document's shape against the OpenAPI 3.1 structure schema in test resources. */
    List<String> structure(JsonNode doc) {
        return validate(registry.getSchema(SchemaLocation.of(STRUCTURE_IRI)), doc, "document");
    }

    /** Every Schema Object (components, parameters, headers, media types) against the JSON Schema 2020-12 meta-schema. */
    List<String> schemas(JsonNode doc) {
        Schema meta = registry.getSchema(SchemaLocation.of(META_2020_12));
        List<String> out = new ArrayList<>();
        Map<String, JsonNode> found = new java.util.LinkedHashMap<>();
        doc.path("components").path("schemas").fields().forEachRemaining(e -> found.put("/components/schemas/" + e.getKey(), e.getValue()));
        collectSchemas(doc.path("paths"), "/paths", found);
        for (String section : List.of("responses", "parameters", "headers", "requestBodies")) {
            collectSchemas(doc.path("components").path(section), "/components/" + section, found);
        }
        for (Map.Entry<String, JsonNode> e : found.entrySet()) out.addAll(validate(meta, e.getValue(), e.getKey()));
        return out;
    }

    /** Every {@code $ref} is local and points at something in the document. */
    List<String> refs(JsonNode doc) {
        List<String> out = new ArrayList<>();
        walk(doc, "", (node, where) -> {
            JsonNode ref = node.get("$ref");
            if (ref == null || !ref.isTextual()) return;
            String r = ref.asText();
            if (!r.startsWith("#/")) out.add(where + ": $ref '" + r + "' is not local to the document");
            else if (doc.at(r.substring(1)).isMissingNode()) out.add(where + ": $ref '" + r + "' does not resolve");
        });
        return out;
    }

    /** Our rules for operations and their responses. */
    List<String> operations(JsonNode doc) {
        List<String> out = new ArrayList<>();
        Set<String> operationIds = new java.util.HashSet<>();
        for (Iterator<Map.Entry<String, JsonNode>> paths = doc.path("paths").fields(); paths.hasNext(); ) {
            Map.Entry<String, JsonNode> p = paths.next();
            String template = p.getKey();
            JsonNode item = p.getValue();
            Set<String> inTemplate = new TreeSet<>();
            Matcher m = TEMPLATE_PARAM.matcher(template);
            while (m.find()) inTemplate.add(m.group(1));
            for (Iterator<Map.Entry<String, JsonNode>> ops = item.fields(); ops.hasNext(); ) {
                Map.Entry<String, JsonNode> o = ops.next();
                if (!METHODS.contains(o.getKey())) continue;
                String where = o.getKey().toUpperCase(Locale.ROOT) + " " + template;
                JsonNode op = o.getValue();
                String id = op.path("operationId").asText("");
                if (id.isEmpty()) out.add(where + ": no operationId");
                else if (!operationIds.add(id)) out.add(where + ": operationId '" + id + "' is used twice");
                out.addAll(operation(doc, where, item, op, inTemplate));
            }
        }
        return out;
    }

    private List<String> operation(JsonNode doc, String where, JsonNode item, JsonNode op, Set<String> inTemplate) {
        List<String> out = new ArrayList<>();
        List<JsonNode> params = new ArrayList<>();
        item.path("parameters").forEach(n -> params.add(deref(doc, n)));
        op.path("parameters").forEach(n -> params.add(deref(doc, n)));
        Set<String> pathParams = new TreeSet<>();
        boolean query = false;
        boolean missing = false;
        for (JsonNode n : params) {
            String in = n.path("in").asText();
            if (in.equals("path")) pathParams.add(n.path("name").asText());
            if (in.equals("query")) query = true;
            if (in.equals("query") && n.path("name").asText().equals("missing")) missing = true;
        }
        if (!pathParams.equals(inTemplate)) out.add(where + ": path parameters declared " + pathParams + " but the template has " + inTemplate);

        JsonNode responses = op.path("responses");
        Set<String> codes = new LinkedHashSet<>();
        responses.fieldNames().forEachRemaining(codes::add);
        if (codes.stream().noneMatch(c -> c.startsWith("2"))) out.add(where + ": no 2xx response");
        boolean secured = !(op.has("security") && op.get("security").isArray() && op.get("security").isEmpty());
        Set<String> needed = new TreeSet<>();
        if (secured) needed.addAll(List.of("401", "403"));
        // A path parameter names something that may not exist, unless the operation creates it.
        if (!inTemplate.isEmpty() && !op.path("x-creates").asBoolean(false)) needed.add("404");
        if (query) needed.add("400");
        if (op.has("requestBody")) needed.addAll(List.of("400", "413"));
        if (missing) needed.add("422");
        int mediaTypes2xx = 0;
        for (String c : codes) {
            JsonNode r = deref(doc, responses.get(c));
            if (c.startsWith("2")) mediaTypes2xx = Math.max(mediaTypes2xx, r.path("content").size());
        }
        // The API negotiates strictly; operations endpoints (metrics) fall back to their default format.
        if (mediaTypes2xx > 1 && where.contains(" /v1/")) needed.add("406");
        for (String c : needed) if (!codes.contains(c)) out.add(where + ": does not declare " + c);

        for (String c : codes) {
            JsonNode r = deref(doc, responses.get(c));
            if (!r.path("headers").has("X-Request-Id")) out.add(where + " " + c + ": no X-Request-Id header");
            if (c.startsWith("4") || c.startsWith("5")) out.addAll(problemResponse(doc, where + " " + c, c, r));
        }
        return out;
    }

    /** An error response is problem+json only, its schema is Problem (or allOf Problem with a matching status). */
    private List<String> problemResponse(JsonNode doc, String where, String code, JsonNode r) {
        JsonNode content = r.path("content");
        if (content.size() != 1 || !content.has(PROBLEM)) return List.of(where + ": content must be " + PROBLEM + " only");
        JsonNode schema = content.get(PROBLEM).path("schema");
        JsonNode resolved = deref(doc, schema);
        if (PROBLEM_REF.equals(schema.path("$ref").asText())) return List.of();
        JsonNode allOf = resolved.path("allOf");
        if (!allOf.isArray() || allOf.isEmpty() || !PROBLEM_REF.equals(allOf.get(0).path("$ref").asText())) {
            return List.of(where + ": schema is neither Problem nor allOf [Problem, ...]");
        }
        for (JsonNode part : allOf) {
            JsonNode status = part.path("properties").path("status").path("const");
            if (!status.isMissingNode() && !status.asText().equals(code)) return List.of(where + ": schema fixes status " + status.asText());
        }
        return List.of();
    }

    /** Follows local $refs to the object they name (the node itself when it has none). */
    static JsonNode deref(JsonNode doc, JsonNode n) {
        for (int hops = 0; n != null && n.has("$ref") && hops < 20; hops++) n = doc.at(n.get("$ref").asText().substring(1));
        return n;
    }

    private interface Visitor {
        void visit(JsonNode node, String where);
    }

    private static void walk(JsonNode node, String where, Visitor v) {
        if (node.isObject()) {
            v.visit(node, where);
            node.fields().forEachRemaining(e -> walk(e.getValue(), where + "/" + OpenApiContract.escape(e.getKey()), v));
        } else if (node.isArray()) {
            for (int i = 0; i < node.size(); i++) walk(node.get(i), where + "/" + i, v);
        }
    }

    /** Schema Objects under a non-schema part of the document: the value of every {@code schema} member. */
    private static void collectSchemas(JsonNode node, String where, Map<String, JsonNode> out) {
        if (node.isObject()) {
            node.fields().forEachRemaining(e -> {
                String at = where + "/" + OpenApiContract.escape(e.getKey());
                if (e.getKey().equals("schema")) out.put(at, e.getValue());
                else if (!e.getKey().equals("example") && !e.getKey().equals("examples")) collectSchemas(e.getValue(), at, out);
            });
        } else if (node.isArray()) {
            for (int i = 0; i < node.size(); i++) collectSchemas(node.get(i), where + "/" + i, out);
        }
    }

    private static List<String> validate(Schema schema, JsonNode instance, String where) {
        List<String> out = new ArrayList<>();
        for (Error e : schema.validate(instance.toString(), InputFormat.JSON)) {
            out.add(where + ": " + e.getInstanceLocation() + " " + e.getMessage());
        }
        return out;
    }

    /** "METHOD template" of every operation in the document. */
    static Set<String> operationKeys(JsonNode doc) {
        Set<String> out = new TreeSet<>();
        doc.path("paths").fields().forEachRemaining(p -> p.getValue().fieldNames().forEachRemaining(m -> {
            if (METHODS.contains(m)) out.add(m.toUpperCase(Locale.ROOT) + " " + p.getKey());
        }));
        return out;
    }
}
