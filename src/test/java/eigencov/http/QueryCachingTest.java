package eigencov.http;

import com.fasterxml.jackson.databind.JsonNode;
import eigencov.app.App;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

import java.io.ByteArrayInputStream;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.util.ArrayList;
import java.util.List;
import java.util.zip.GZIPInputStream;

import static eigencov.http.QueryFixture.MAR;
import static eigencov.http.QueryFixture.assertMatrix;
import static eigencov.http.QueryFixture.matrix;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * ETag / If-None-Match and gzip, seen on the wire: java.net.http neither decompresses nor
 * revalidates by itself, so the raw headers and bytes are what the server sent.
 */
class QueryCachingTest {
    private static final HttpClient CLIENT = HttpClient.newHttpClient();
    private static App app;
    private static List<String> all40;

    @BeforeAll
    static void start() {
        app = QueryFixture.start("caching");
        all40 = new ArrayList<>(MAR.tickers());
    }

    @AfterAll
    static void stop() {
        app.close();
    }

    private static HttpResponse<byte[]> get(String pathAndQuery, String... headers) {
        HttpRequest.Builder b = HttpRequest.newBuilder(URI.create("http://127.0.0.1:" + app.port() + pathAndQuery));
        if (headers.length > 0) b.headers(headers);
        try {
            return CLIENT.send(b.GET().build(), HttpResponse.BodyHandlers.ofByteArray());
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            throw new IllegalStateException(e);
        }
    }

    private static String etag(HttpResponse<?> r) {
        return r.headers().firstValue("ETag").orElseThrow();
    }

    @Test
    void same_request_on_the_same_fit_has_the_same_strong_etag_and_revalidates_with_304() {
        String q = "/v1/models/synth/covariance?tickers=T0001,T0002,T0003";
        HttpResponse<byte[]> first = get(q);
        assertEquals(200, first.statusCode());
        String tag = etag(first);
        assertTrue(tag.matches("\"[A-Za-z0-9_-]{22}\""), tag);
        assertEquals(tag, etag(get(q)));
        HttpResponse<byte[]> again = get(q, "If-None-Match", tag);
        assertEquals(304, again.statusCode());
        assertEquals(0, again.body().length);
        assertEquals(tag, etag(again));
        assertEquals(304, get(q, "If-None-Match", "\"other\", W/" + tag).statusCode(), "weak comparison, list of tags");
        assertEquals(304, get(q, "If-None-Match", "*").statusCode());
        assertEquals(200, get(q, "If-None-Match", "\"other\"").statusCode());
    }

    @Test
    void etag_changes_with_the_fit_the_options_and_the_format() {
        String q = "/v1/models/synth/covariance?tickers=T0001,T0002,T0003";
        String newest = etag(get(q));
        String older = etag(get(q + "&fit=10"));
        assertNotEquals(newest, older);
        assertEquals(newest, etag(get(q + "&fit=11")), "the newest fit named explicitly is the same answer");
        assertNotEquals(newest, etag(get(q + "&scale=annual")));
        assertNotEquals(newest, etag(get("/v1/models/synth/covariance?tickers=T0002,T0001,T0003")));
        assertNotEquals(newest, etag(get(q, "Accept", "text/csv")));
        HttpResponse<byte[]> stale = get(q + "&fit=10", "If-None-Match", newest);
        assertEquals(200, stale.statusCode(), "a tag of another fit does not revalidate");
    }

    @Test
    void large_answers_are_gzipped_when_the_client_accepts_gzip() throws IOException {
        String q = "/v1/models/synth/covariance?tickers=" + String.join(",", all40);
        HttpResponse<byte[]> zipped = get(q, "Accept-Encoding", "gzip");
        assertEquals(200, zipped.statusCode());
        assertEquals("gzip", zipped.headers().firstValue("Content-Encoding").orElse(""));
        byte[] plain;
        try (GZIPInputStream in = new GZIPInputStream(new ByteArrayInputStream(zipped.body()))) {
            plain = in.readAllBytes();
        }
        assertTrue(zipped.body().length < plain.length / 2, "compressed " + zipped.body().length + " of " + plain.length);
        JsonNode body = QueryFixture.JSON.readTree(plain);
        assertMatrix(NaiveCovariance.of(MAR, all40, 1), matrix(body.get("matrix")), 1e-12);

        HttpResponse<byte[]> identity = get(q);
        assertTrue(identity.headers().firstValue("Content-Encoding").isEmpty());
        assertEquals(plain.length, identity.body().length);
        assertNotEquals(etag(identity), etag(zipped), "the gzip and identity bodies are different representations");
        assertEquals(304, get(q, "Accept-Encoding", "gzip", "If-None-Match", etag(zipped)).statusCode());
    }

    @Test
    void small_answers_and_refused_gzip_go_uncompressed() {
        String small = "/v1/models/synth/covariance?tickers=T0001,T0002";
        assertTrue(get(small, "Accept-Encoding", "gzip").headers().firstValue("Content-Encoding").isEmpty());
        String large = "/v1/models/synth/covariance?tickers=" + String.join(",", all40);
        assertTrue(get(large, "Accept-Encoding", "gzip;q=0, identity").headers().firstValue("Content-Encoding").isEmpty());
    }

    @Test
    void every_answer_names_its_fit_and_carries_the_caution_in_headers() {
        for (String q : List.of("/v1/models/synth/covariance?tickers=T0001", "/v1/models/synth/factors",
                "/v1/models/synth/factor-returns", "/v1/models/synth/exposures?tickers=T0001")) {
            HttpResponse<byte[]> r = get(q);
            assertEquals("11", r.headers().firstValue("X-Fit-Id").orElse(""), q);
            assertEquals("synth", r.headers().firstValue("X-Fit-Model").orElse(""), q);
            assertEquals("2025-03-31", r.headers().firstValue("X-Fit-As-Of").orElse(""), q);
            assertEquals(ResponseSender.CAUTION, r.headers().firstValue("X-Caution").orElse(""), q);
            assertEquals("no-cache", r.headers().firstValue("Cache-Control").orElse(""), q);
        }
    }
}
