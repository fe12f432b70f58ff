package eigencov.http;

import io.javalin.http.Context;

import java.nio.charset.StandardCharsets;
import java.security.MessageDigest;
import java.security.NoSuchAlgorithmException;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.Set;

/**
 * Bearer API keys with scopes {@code read} and {@code write} (write implies read), parsed from
 * {@code scope:key,scope:key}. Only SHA-256 digests of the keys are kept, and a presented key is
 * compared with every one of them in constant time, so neither the keys nor their positions leak.
 *
 * <p>Rule: GET and HEAD need {@code read}, every other method {@code write}; the paths in
 * {@link #OPEN_PATHS} need nothing. No key, or an unknown one, is 401 with
 * {@code WWW-Authenticate: Bearer}; a known key without the scope is 403.
 */
public final class ApiKeys {
    /** Liveness and readiness stay open so that load balancers and orchestrators can probe. */
    static final Set<String> OPEN_PATHS = Set.of("/health", "/ready");
    private static final String REALM = "Bearer realm=\"eigencov\"";

    public enum Scope { READ, WRITE }

    private record Entry(byte[] digest, Scope scope) {
    }

    private final List<Entry> entries;

    private ApiKeys(List<Entry> entries) {
        this.entries = List.copyOf(entries);
    }

    /** No keys: every request is allowed (the server then binds to loopback only). */
    public static ApiKeys none() {
        return new ApiKeys(List.of());
    }

    /**
     * @param spec {@code scope:key} pairs separated by commas; empty or blank means no keys
     * @throws IllegalArgumentException naming the bad entry by position (never echoing the key)
     */
    public static ApiKeys parse(String spec) {
        List<Entry> out = new ArrayList<>();
        if (spec == null || spec.isBlank()) return none();
        String[] parts = spec.split(",", -1);
        for (int i = 0; i < parts.length; i++) {
            String part = parts[i].strip();
            int colon = part.indexOf(':');
            String scope = colon < 0 ? "" : part.substring(0, colon).strip().toLowerCase(Locale.ROOT);
            String key = colon < 0 ? "" : part.substring(colon + 1).strip();
            if (!scope.equals("read") && !scope.equals("write")) {
                throw new IllegalArgumentException("API key entry " + (i + 1) + " must look like read:KEY or write:KEY");
            }
            if (key.isEmpty() || key.chars().anyMatch(Character::isWhitespace)) {
                throw new IllegalArgumentException("API key entry " + (i + 1) + " has an empty key or one with spaces");
            }
            out.add(new Entry(sha256(key), scope.equals("write") ? Scope.WRITE : Scope.READ));
        }
        return new ApiKeys(out);
    }

    public boolean isEmpty() {
        return entries.isEmpty();
    }

    /** The scope of {@code key}, or null when it is unknown. Looks at every entry whatever matches. */
    Scope scopeOf(String key) {
        byte[] d = sha256(key);
        Scope found = null;
        for (Entry e : entries) {
            if (MessageDigest.isEqual(d, e.digest()) && (found == null || e.scope() == Scope.WRITE)) found = e.scope();
        }
        return found;
    }

    /** Before-handler: lets the request through or throws the 401/403 problem. */
    void authorize(Context ctx) {
        if (entries.isEmpty() || OPEN_PATHS.contains(ctx.path())) return;
        String header = ctx.header("Authorization");
        if (header == null || !header.regionMatches(true, 0, "Bearer ", 0, 7) || header.substring(7).isBlank()) {
            ctx.header("WWW-Authenticate", REALM);
            throw new ApiException(401, "unauthorized", "Unauthorized",
                    "send an API key as 'Authorization: Bearer <key>'", List.of(FieldError.field("Authorization", "missing")));
        }
        Scope scope = scopeOf(header.substring(7).strip());
        if (scope == null) {
            ctx.header("WWW-Authenticate", REALM + ", error=\"invalid_token\"");
            throw new ApiException(401, "unauthorized", "Unauthorized", "the API key is not known",
                    List.of(FieldError.field("Authorization", "unknown key")));
        }
        String method = ctx.method().name();
        boolean reading = method.equals("GET") || method.equals("HEAD");
        if (!reading && scope != Scope.WRITE) {
            ctx.header("WWW-Authenticate", REALM + ", error=\"insufficient_scope\", scope=\"write\"");
            throw new ApiException(403, "forbidden", "Forbidden", method + " needs a key with the write scope; this key may only read",
                    List.of(FieldError.field("Authorization", "read-only key")));
        }
    }

    private static byte[] sha256(String s) {
        try {
            return MessageDigest.getInstance("SHA-256").digest(s.getBytes(StandardCharsets.UTF_8));
        } catch (NoSuchAlgorithmException e) {
            throw new IllegalStateException("SHA-256 is part of every Java platform", e);
        }
    }
}
