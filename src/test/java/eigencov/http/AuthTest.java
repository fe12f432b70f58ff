package eigencov.http;

import eigencov.app.App;
import eigencov.app.AppConfig;
import io.restassured.RestAssured;
import io.restassured.specification.RequestSpecification;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

import static io.restassured.RestAssured.given;
import static org.hamcrest.Matchers.equalTo;
import static org.hamcrest.Matchers.startsWith;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;

class AuthTest {
    private static final String READ_KEY = "r-0123456789abcdef";
    private static final String WRITE_KEY = "w-fedcba9876543210";
    private static final String UPLOAD = "date,ticker,value\n2025-01-02,AAA,0.01\n";
    private static App app;

    @BeforeAll
    static void start() {
        app = App.create(AppConfig.forTest("auth").withApiKeys("read:" + READ_KEY + ", write:" + WRITE_KEY)).start();
        RestAssured.port = app.port();
    }

    @AfterAll
    static void stop() {
        app.close();
    }

    private static RequestSpecification as(String key) {
        RequestSpecification r = given();
        return key == null ? r : r.header("Authorization", "Bearer " + key);
    }

    @ParameterizedTest(name = "{0} {1} with key {2} -> {3}")
    @CsvSource(nullValues = "none", value = {
            "POST, /v1/panels/guarded/returns, none,               401",
            "POST, /v1/panels/guarded/returns, not-a-key,          401",
            "POST, /v1/panels/guarded/returns, " + READ_KEY + ",  403",
            "POST, /v1/panels/guarded/returns, " + WRITE_KEY + ", 200",
            "GET,  /v1/panels,                 none,               401",
            "GET,  /v1/panels,                 not-a-key,          401",
            "GET,  /v1/panels,                 " + READ_KEY + ",  200",
            "GET,  /v1/panels,                 " + WRITE_KEY + ", 200",
            "GET,  /health,                    none,               200",
            "GET,  /ready,                     none,               200"})
    void scopes_decide_who_may_read_and_write(String method, String path, String key, int status) {
        var r = method.equals("POST") ? as(key).contentType("text/csv").body(UPLOAD).post(path) : as(key).get(path);
        r.then().statusCode(status);
        if (status == 401 || status == 403) {
            r.then().contentType(startsWith(Problem.CONTENT_TYPE)).body("status", equalTo(status))
                    .body("errors[0].field", equalTo("Authorization"))
                    .header("WWW-Authenticate", startsWith("Bearer"));
        }
    }

    @Test
    void a_rejected_upload_stores_nothing() {
        as(READ_KEY).contentType("text/csv").body(UPLOAD).post("/v1/panels/readonly/returns").then().statusCode(403);
        as(READ_KEY).get("/v1/panels/readonly").then().statusCode(404);
    }

    @Test
    void keys_are_matched_only_as_digests_and_scopes_parse_strictly() {
        ApiKeys keys = ApiKeys.parse("read:abc,write:def");
        assertNull(keys.scopeOf("ab"));
        assertNull(keys.scopeOf("abcd"));
        assertFalse(keys.isEmpty());
        assertThrows(IllegalArgumentException.class, () -> ApiKeys.parse("admin:abc"));
        assertThrows(IllegalArgumentException.class, () -> ApiKeys.parse("read:"));
        assertThrows(IllegalArgumentException.class, () -> ApiKeys.parse("abc"));
        var e = assertThrows(AppConfig.ConfigException.class, () -> AppConfig.defaults().withApiKeys("root:secret-value"));
        assertFalse(e.getMessage().contains("secret-value"), e.getMessage());
    }
}
