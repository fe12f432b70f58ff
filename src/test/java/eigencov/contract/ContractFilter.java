package eigencov.contract;

import io.restassured.filter.Filter;
import io.restassured.filter.FilterContext;
import io.restassured.response.Response;
import io.restassured.specification.FilterableRequestSpecification;
import io.restassured.specification.FilterableResponseSpecification;

import java.net.URI;
import java.util.List;
import java.util.Set;
import java.util.concurrent.ConcurrentHashMap;

/**
 * A rest-assured filter installed for the whole test suite (see {@link ContractExtension}): every
 * response any test receives is checked against {@code openapi/eigencov.yaml}, and so is every
 * request body the server accepted. A violation fails the test that caused it.
 */
public final class ContractFilter implements Filter {
    static final ContractFilter INSTANCE = new ContractFilter();

    /** "METHOD template status" seen during this run, for the coverage check. */
    static final Set<String> SEEN = ConcurrentHashMap.newKeySet();

    @Override
    public Response filter(FilterableRequestSpecification req, FilterableResponseSpecification res, FilterContext ctx) {
        Response response = ctx.next(req, res);
        String path = URI.create(req.getURI()).getRawPath();
        OpenApiContract contract = OpenApiContract.get();
        String body = isBinary(response.getContentType()) ? "" : response.getBody().asString();
        List<String> problems = contract.checkResponse(req.getMethod(), path, response.getStatusCode(), response.getContentType(), body);
        java.util.Set<String> headers = new java.util.HashSet<>();
        response.getHeaders().forEach(h -> headers.add(h.getName()));
        problems = concat(problems, contract.checkHeaders(req.getMethod(), path, response.getStatusCode(), headers));
        if (response.getStatusCode() < 300 && req.getBody() != null && req.getBody() instanceof String s) {
            problems = concat(problems, contract.checkRequest(req.getMethod(), path, req.getContentType(), s));
        }
        String template = contract.templateFor(path);
        if (template != null) SEEN.add(req.getMethod() + " " + template + " " + response.getStatusCode());
        if (!problems.isEmpty()) {
            throw new AssertionError("response does not match openapi/eigencov.yaml:\n  " + String.join("\n  ", problems)
                    + "\nbody: " + (body.length() > 2000 ? body.substring(0, 2000) + "..." : body));
        }
        return response;
    }

    private static boolean isBinary(String contentType) {
        return contentType != null && (contentType.startsWith("application/x-npy") || contentType.startsWith("application/octet-stream"));
    }

    private static List<String> concat(List<String> a, List<String> b) {
        if (b.isEmpty()) return a;
        var out = new java.util.ArrayList<>(a);
        out.addAll(b);
        return out;
    }
}
