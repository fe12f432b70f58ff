package eigencov.http;

import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

import java.util.List;

import static org.junit.jupiter.api.Assertions.assertEquals;

/** Accept negotiation by RFC 9110 section 12.5.1: most specific matching range, highest quality, endpoint order on ties. */
class RepresentationTest {
    private static final List<Representation> ALL = List.of(Representation.JSON, Representation.CSV, Representation.NPY);

    @ParameterizedTest(name = "Accept: {0} -> {1}")
    @CsvSource(delimiter = '|', value = {
            "''                                          | JSON",
            "*/*                                         | JSON",
            "text/csv                                    | CSV",
            "TEXT/CSV                                    | CSV",
            "application/x-npy                           | NPY",
            "application/*                               | JSON",
            "text/*                                      | CSV",
            "application/json;q=0.5, text/csv            | CSV",
            "*/*;q=0.1, application/x-npy                | NPY",
            "application/*;q=0.9, application/json;q=0.2 | NPY",
            "text/html, */*;q=0.8                        | JSON",
            "application/json;q=abc, text/csv;q=0.3      | CSV"})
    void picks_the_best_acceptable_format(String accept, Representation expected) {
        assertEquals(expected, Representation.negotiate(accept, ALL));
    }
}
