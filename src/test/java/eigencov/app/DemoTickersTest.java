package eigencov.app;

import org.junit.jupiter.api.Test;

import java.io.BufferedReader;
import java.io.IOException;
import java.io.InputStream;
import java.io.InputStreamReader;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.HashSet;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Set;
import java.util.TreeSet;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import java.util.zip.GZIPInputStream;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * Every ticker of the invented Vellmoor Exchange has the exchange's own form, four capital letters
 * and the suffix {@code .VLM} (demo-data/README.md, "Tickers"): bare four-letter codes are also
 * symbols of real listed securities, a suffixed one is not. Checked in every demo file that names
 * tickers, and in the examples of the README, the tour and the API contract, where a demo root
 * must never appear without its suffix.
 */
class DemoTickersTest {
    /** The Vellmoor ticker form (the generator, scripts/gen-demo-data, asserts the same). */
    static final Pattern FORM = Pattern.compile("[A-Z]{4}\\.VLM");
    /**
     * A word that claims the suffix; it must then have the whole form (catches {@code BLDNX.VLM}). A word
     * stops at a dot, so a field path such as {@code weights.BLDN.VLM} yields its ticker.
     */
    private static final Pattern SUFFIXED = Pattern.compile("(?<![A-Za-z0-9_])[A-Za-z0-9_]*\\.VLM(?![A-Za-z0-9_])");
    private static final Path DEMO = Path.of("demo-data");
    /** Files with examples that use demo tickers. */
    private static final List<Path> EXAMPLES = List.of(Path.of("README.md"), Path.of("DEVELOPERS.md"),
            Path.of("scripts", "tour.sh"), Path.of("openapi", "eigencov.yaml"), Path.of("docs/deployment.md"),
            DEMO.resolve("models.json"));

    @Test
    void every_listed_security_has_the_vellmoor_form_and_a_unique_ticker() throws IOException {
        List<String> listed = firstColumn(Files.readAllLines(DEMO.resolve("securities.csv")));
        assertEquals(500, listed.size(), "securities.csv lists the 500 invented names");
        assertEquals(listed.size(), new HashSet<>(listed).size(), "tickers are unique");
        assertEquals(List.of(), offForm(listed), "securities.csv tickers not of the form " + FORM);
    }

    @Test
    void every_return_and_truth_row_names_a_listed_security_of_the_vellmoor_form() throws IOException {
        Set<String> listed = new HashSet<>(firstColumn(Files.readAllLines(DEMO.resolve("securities.csv"))));
        Set<String> inReturns = new TreeSet<>(tickerColumn(gunzipLines(DEMO.resolve("returns.csv.gz"))));
        assertEquals(listed, inReturns, "returns.csv.gz has returns of exactly the listed names");
        Set<String> exposures = new TreeSet<>(firstColumn(Files.readAllLines(DEMO.resolve("truth/exposures.csv"))));
        assertEquals(listed, exposures, "truth/exposures.csv has a row per listed name");
        // events.csv: exchange closures have an empty ticker, every other event names a listed security
        List<String> events = new ArrayList<>();
        for (String t : firstColumn(Files.readAllLines(DEMO.resolve("truth/events.csv")))) {
            if (!t.isEmpty()) {
                events.add(t);
            }
        }
        assertTrue(events.size() > 100, "events.csv names tickers (listings, delistings, halts)");
        assertEquals(List.of(), offForm(events), "truth/events.csv tickers not of the form " + FORM);
        assertTrue(listed.containsAll(events), "truth/events.csv names only listed securities");
    }

    @Test
    void the_demo_shaped_test_fixture_uses_the_vellmoor_form() throws IOException {
        List<String> tickers = tickerColumn(gunzipLines(Path.of("src/test/resources/demo-mini/returns.csv.gz")));
        assertEquals(5, tickers.size(), "demo-mini has five rows");
        assertEquals(List.of(), offForm(tickers), "demo-mini tickers not of the form " + FORM);
    }

    @Test
    void examples_never_use_a_demo_ticker_without_its_suffix() throws IOException {
        Set<String> roots = roots();
        List<String> problems = new ArrayList<>();
        for (Path p : EXAMPLES) {
            if (Files.exists(p)) {
                for (String problem : exampleProblems(Files.readString(p), roots)) {
                    problems.add(p + ": " + problem);
                }
            }
        }
        assertEquals(List.of(), problems);
    }

    @Test
    void the_example_check_finds_a_bare_root_and_a_malformed_suffix() throws IOException {
        // the checker itself: a planted bare demo root and a planted wrong shape must be reported
        Set<String> roots = roots();
        String planted = "curl -d '{\"tickers\":[\"BLDN\",\"BNDX.VLM\",\"BRNDX.VLM\"]}' # and DEMI.";
        assertEquals(List.of("bare demo ticker BLDN (write BLDN.VLM)", "bare demo ticker DEMI (write DEMI.VLM)",
                "BRNDX.VLM is not of the form " + FORM), exampleProblems(planted, roots));
        assertEquals(List.of(), exampleProblems("{\"tickers\":[\"BLDN.VLM\",\"QRLX.VLM\"]} weights.DEMI.VLM BLDNS HTTP", roots));
    }

    /** Bare demo roots (not followed by {@code .VLM}) and suffixed tokens that are not of the form, in text order. */
    static List<String> exampleProblems(String text, Set<String> roots) {
        List<String> problems = new ArrayList<>();
        Matcher bare = Pattern.compile("(?<![A-Za-z0-9._:/-])([A-Z]{4})(?![A-Za-z0-9_:/-])(?!\\.VLM(?![A-Za-z0-9_]))")
                .matcher(text);
        while (bare.find()) {
            if (roots.contains(bare.group(1))) {
                problems.add("bare demo ticker " + bare.group(1) + " (write " + bare.group(1) + ".VLM)");
            }
        }
        Matcher suffixed = SUFFIXED.matcher(text);
        while (suffixed.find()) {
            if (!FORM.matcher(suffixed.group()).matches()) {
                problems.add(suffixed.group() + " is not of the form " + FORM);
            }
        }
        return problems;
    }

    /** The four-letter roots of the listed tickers. */
    private static Set<String> roots() throws IOException {
        Set<String> roots = new LinkedHashSet<>();
        for (String t : firstColumn(Files.readAllLines(DEMO.resolve("securities.csv")))) {
            roots.add(t.substring(0, t.indexOf('.') < 0 ? t.length() : t.indexOf('.')));
        }
        assertEquals(500, roots.size());
        return roots;
    }

    private static List<String> offForm(List<String> tickers) {
        List<String> off = new ArrayList<>();
        for (String t : tickers) {
            if (!FORM.matcher(t).matches()) {
                off.add(t);
            }
        }
        return off;
    }

    /** First CSV column of every line after the header. */
    private static List<String> firstColumn(List<String> lines) {
        List<String> out = new ArrayList<>();
        for (String line : lines.subList(1, lines.size())) {
            if (!line.isEmpty()) {
                out.add(line.substring(0, line.indexOf(',')));
            }
        }
        return out;
    }

    /** Second column (the ticker of a {@code date,ticker,value} file) of every line after the header. */
    private static List<String> tickerColumn(List<String> lines) {
        List<String> out = new ArrayList<>();
        for (String line : lines.subList(1, lines.size())) {
            int a = line.indexOf(',');
            out.add(line.substring(a + 1, line.indexOf(',', a + 1)));
        }
        return out;
    }

    private static List<String> gunzipLines(Path p) throws IOException {
        try (InputStream in = new GZIPInputStream(Files.newInputStream(p));
             BufferedReader r = new BufferedReader(new InputStreamReader(in, StandardCharsets.UTF_8))) {
            List<String> lines = new ArrayList<>();
            for (String line = r.readLine(); line != null; line = r.readLine()) {
                lines.add(line);
            }
            return lines;
        }
    }
}
