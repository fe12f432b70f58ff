package eigencov.http;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import eigencov.app.App;
import eigencov.app.AppConfig;
import eigencov.math.Exclusion;
import eigencov.math.FactorModel;
import eigencov.service.InMemoryFits;
import eigencov.service.ServedFit;
import eigencov.service.TestFits;
import io.restassured.response.Response;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.time.LocalDate;
import java.util.List;

import static org.junit.jupiter.api.Assertions.assertEquals;

/**
 * The fits the query tests serve, and the real App wired to them on a free port.
 * <ul>
 * <li>model "toy": fit 1 (2025-01-31), Toy model M of docs/methods.md (tickers AAA, BBB, CCC);</li>
 * <li>model "synth": fit 10 (2025-02-28) and fit 11 (2025-03-31), 40 tickers T0000..T0039, k = 3,
 * non-diagonal F, different seeds; ticker GONE excluded from both for coverage.</li>
 * </ul>
 */
final class QueryFixture {
    static final ObjectMapper JSON = new ObjectMapper();
    static final FactorModel TOY = TestFits.toyModelM();
    static final FactorModel FEB = TestFits.synthetic("T", 40, 3, 1L, true);
    static final FactorModel MAR = TestFits.synthetic("T", 40, 3, 2L, true);
    static final List<Exclusion> GONE = List.of(new Exclusion("GONE", 12, 27, Exclusion.COVERAGE));
    static final ServedFit TOY_FIT = TestFits.served(1, "toy", LocalDate.parse("2025-01-31"), TOY, 30, List.of(), 7L);
    static final ServedFit FEB_FIT = TestFits.served(10, "synth", LocalDate.parse("2025-02-28"), FEB, 30, GONE, 8L);
    static final ServedFit MAR_FIT = TestFits.served(11, "synth", LocalDate.parse("2025-03-31"), MAR, 30, GONE, 9L);

    private QueryFixture() {
    }

    static App start(String name) {
        InMemoryFits fits = new InMemoryFits().add(TOY_FIT).add(FEB_FIT).add(MAR_FIT);
        return App.create(AppConfig.forTest(name), fits).start();
    }

    static JsonNode json(Response r) {
        try {
            return JSON.readTree(r.asByteArray());
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    static double[][] matrix(JsonNode rows) {
        double[][] m = new double[rows.size()][];
        for (int r = 0; r < m.length; r++) {
            m[r] = new double[rows.get(r).size()];
            for (int c = 0; c < m[r].length; c++) m[r][c] = rows.get(r).get(c).doubleValue();
        }
        return m;
    }

    static List<String> strings(JsonNode array) {
        return JSON.convertValue(array, JSON.getTypeFactory().constructCollectionType(List.class, String.class));
    }

    /** Element-wise agreement within {@code relTol} of the largest |expected| entry. */
    static void assertMatrix(double[][] expected, double[][] actual, double relTol) {
        assertEquals(expected.length, actual.length, "rows");
        double tol = relTol * NaiveCovariance.maxAbs(expected);
        for (int r = 0; r < expected.length; r++) {
            assertEquals(expected[r].length, actual[r].length, "columns of row " + r);
            for (int c = 0; c < expected[r].length; c++) {
                assertEquals(expected[r][c], actual[r][c], tol, "element (" + r + ", " + c + ")");
            }
        }
    }

    static void assertFit(JsonNode fit, ServedFit expected) {
        assertEquals(expected.ref().id(), fit.get("id").asLong());
        assertEquals(expected.ref().model(), fit.get("model").asText());
        assertEquals(expected.ref().asOf().toString(), fit.get("asOf").asText());
        assertEquals(expected.ref().createdAt().toString(), fit.get("createdAt").asText());
    }
}
