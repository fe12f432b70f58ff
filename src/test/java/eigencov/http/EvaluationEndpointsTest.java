package eigencov.http;

import eigencov.app.App;
import eigencov.app.AppConfig;
import eigencov.service.SyntheticReturns;
import io.restassured.RestAssured;
import io.restassured.http.ContentType;
import io.restassured.path.json.JsonPath;
import io.restassured.path.json.config.JsonPathConfig;
import io.restassured.response.ValidatableResponse;
import org.apache.commons.math3.distribution.MultivariateNormalDistribution;
import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.LUDecomposition;
import org.apache.commons.math3.linear.RealMatrix;
import org.apache.commons.math3.stat.descriptive.DescriptiveStatistics;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

import java.time.Duration;
import java.time.LocalDate;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Random;
import java.util.TreeMap;
import java.util.TreeSet;

import static io.restassured.RestAssured.given;
import static org.hamcrest.Matchers.contains;
import static org.hamcrest.Matchers.equalTo;
import static org.hamcrest.Matchers.hasItem;
import static org.hamcrest.Matchers.hasKey;
import static org.hamcrest.Matchers.hasSize;
import static org.hamcrest.Matchers.not;
import static org.hamcrest.Matchers.startsWith;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * The evaluation endpoints (docs/design.md section 6), and the evaluation's statistics recomputed here by
 * an independent path: each forecast from the service's own {@code asOf} answers (risk and covariance
 * queries), each realised return from the returns read back, the baselines' matrices from their
 * definitions on those returns, and the inverses, log-determinants and Gaussian densities from
 * commons-math3 (LU decomposition, MultivariateNormalDistribution), never from eigencov.math.
 */
class EvaluationEndpointsTest {
    /** Two double-precision routes to the same statistic: 1e-9 relative (issue 11). */
    private static final double SAME = 1e-9;
    private static final int H = 3;
    private static App app;
    private static List<LocalDate> dates;
    /** Numbers as doubles (rest-assured's default reads JSON numbers as floats). */
    private static final JsonPathConfig DOUBLES = JsonPathConfig.jsonPathConfig().numberReturnType(JsonPathConfig.NumberReturnType.DOUBLE);
    private static long evaluation;
    private static JsonPath result;

    @BeforeAll
    static void start() throws InterruptedException {
        app = App.create(AppConfig.forTest("evaluations-http")).start();
        RestAssured.port = app.port();
        dates = SyntheticReturns.weekdays(LocalDate.of(2024, 1, 1), 120);
        List<SyntheticReturns.Row> rows = new ArrayList<>(SyntheticReturns.rows(41, SyntheticReturns.tickers(15), dates));
        Random gaps = new Random(5);
        rows.removeIf(r -> gaps.nextDouble() < 0.02); // names leave the dates whose horizon they miss
        upload("ep", rows);
        upload("other", SyntheticReturns.rows(42, SyntheticReturns.tickers(6), dates.subList(0, 50)));
        put("e1", "{\"panel\": \"ep\", \"windowDays\": 40, \"factors\": {\"rule\": \"fixed\", \"count\": 2}, \"minCoverage\": 0.9, "
                + "\"basis\": \"covariance\"}");
        put("e2", "{\"panel\": \"ep\", \"windowDays\": 60, \"halfLifeDays\": 30, \"factors\": {\"rule\": \"bai-ng\", \"max\": 4}, "
                + "\"minCoverage\": 0.9, \"basis\": \"correlation\"}");
        put("elsewhere", "{\"panel\": \"other\", \"windowDays\": 30, \"factors\": {\"rule\": \"fixed\", \"count\": 1}, \"minCoverage\": 0.9, "
                + "\"basis\": \"covariance\"}");
        BusyJob.prepare();
        String body = "{\"models\": [\"e1\", \"e2\"], \"from\": \"" + dates.get(70) + "\", \"to\": \"" + dates.get(119)
                + "\", \"every\": \"week\", \"horizonDays\": " + H + ", \"random\": {\"count\": 5, \"names\": 4, \"seed\": 7}, "
                + "\"baselines\": [\"sample\", \"ledoit-wolf\"]}";
        var posted = given().contentType(ContentType.JSON).body(body).post("/v1/evaluations").then().statusCode(202)
                .body("kind", equalTo("evaluation")).extract();
        evaluation = posted.jsonPath().getLong("id");
        assertEquals("/v1/evaluations/" + evaluation, posted.header("Location"));
        assertEquals("/v1/evaluations/" + evaluation, posted.jsonPath().getString("links.evaluation"));
        assertTrue(app.jobs().runner().awaitFinished(evaluation, Duration.ofMinutes(2)).isPresent());
        result = json(given().get("/v1/evaluations/" + evaluation).then().statusCode(200));
    }

    @AfterAll
    static void stop() {
        app.close();
    }

    private static JsonPath json(ValidatableResponse r) {
        return JsonPath.from(r.extract().asString()).using(DOUBLES);
    }

    private static void upload(String panel, List<SyntheticReturns.Row> rows) {
        given().contentType("text/csv").body(SyntheticReturns.csv(rows)).post("/v1/panels/" + panel + "/returns").then().statusCode(200);
    }

    private static void put(String model, String spec) {
        given().contentType(ContentType.JSON).body(spec).put("/v1/models/" + model).then().statusCode(201);
    }

    @Test
    void a_finished_evaluation_lists_dates_drops_and_one_result_per_model_and_baseline() {
        assertEquals("done", result.getString("state"), result.getString("error"));
        assertEquals(result.getInt("progress.total"), result.getInt("progress.done"));
        // weekly from dates[70] (a Monday, 2024-04-08): the Fridays; the last one, 2024-06-14, has no 3 later dates
        assertEquals(dates.get(74).toString(), result.getString("dates[0]"));
        assertEquals(List.of(dates.get(119).toString()), result.getList("dropped.date"));
        assertEquals(List.of("e1", "e1", "e1", "e2", "e2", "e2"), result.getList("results.model"));
        assertEquals(9, result.getInt("results[0].families.equal.n"));
        assertEquals(5, result.getInt("results[0].families.random.n"));
        assertNotNull(result.get("results[1].families.minimum-variance"), "15 names < 40 dates: the sample covariance is invertible");
        given().get("/v1/evaluations").then().statusCode(200).body("evaluations.id", hasItem((int) evaluation))
                .body("evaluations[0]", not(hasKey("results")));
        given().get("/v1/jobs/" + evaluation).then().statusCode(200).body("kind", equalTo("evaluation")).body("state", equalTo("done"));
    }

    @Test
    void series_is_one_row_per_date_and_entry_in_json_and_csv() {
        int rows = result.getList("dates").size() * 6;
        given().get("/v1/evaluations/" + evaluation + "/series").then().statusCode(200).body("series", hasSize(rows))
                .body("series[0].date", equalTo(result.getString("dates[0]"))).body("series[1].baseline", equalTo("sample"));
        String csv = given().accept("text/csv").get("/v1/evaluations/" + evaluation + "/series").then().statusCode(200)
                .contentType(startsWith("text/csv")).extract().asString();
        String[] lines = csv.split("\n");
        assertEquals("date,model,baseline,z,minimumVarianceReturn,minimumVarianceVolatility", lines[0]);
        assertEquals(rows + 1, lines.length);
        assertTrue(lines[1].startsWith(result.getString("dates[0]") + ",e1,,"), lines[1]);
        given().accept("application/x-npy").get("/v1/evaluations/" + evaluation + "/series").then().statusCode(406);
    }

    // ---------------------------------------------------------------------------------- independent path

    /** Everything a model's forecast at one date is, as the service's own answers and read-back returns give it. */
    private record Date(LocalDate t, List<String> names, double[] realised, Map<String, Object> fit) {
    }

    @Test
    void bias_statistics_equal_a_recomputation_from_the_services_own_asof_answers_and_the_stored_returns() {
        Map<LocalDate, Map<String, Double>> returns = readBack();
        List<LocalDate> forecastDates = result.getList("dates", String.class).stream().map(LocalDate::parse).toList();
        Map<String, Integer> entry = Map.of("e1", 0, "e2", 3);
        List<Date> plan = new ArrayList<>();
        for (LocalDate t : forecastDates) {
            TreeSet<String> common = null;
            for (String m : List.of("e1", "e2")) {
                TreeSet<String> u = new TreeSet<>(fitAt(m, t).getList("universe", String.class));
                if (common == null) common = u;
                else common.retainAll(u);
            }
            List<LocalDate> later = laterDates(t);
            List<String> names = new ArrayList<>();
            for (String n : common) if (later.stream().allMatch(d -> returns.get(d).containsKey(n))) names.add(n);
            double[] r = new double[names.size()];
            for (int i = 0; i < names.size(); i++) for (LocalDate d : later) r[i] += returns.get(d).get(names.get(i));
            plan.add(new Date(t, names, r, null));
        }
        for (String model : List.of("e1", "e2")) {
            String at = "results[" + entry.get(model) + "]";
            Stats s = new Stats();
            for (Date d : plan) {
                // the equal portfolio's forecast volatility over h days, as POST /risk?asOf=t answers it
                Map<String, Object> w = new LinkedHashMap<>();
                for (String n : d.names()) w.put(n, 1.0 / d.names().size());
                JsonPath risk = json(given().contentType(ContentType.JSON).body(Map.of("weights", w, "horizonDays", H))
                        .post("/v1/models/" + model + "/risk?asOf=" + d.t()).then().statusCode(200));
                assertEquals(d.t().toString(), risk.getString("fit.asOf"), "the forecast is the fit as of t");
                double req = 0;
                for (double x : d.realised()) req += x / d.names().size();
                s.equal.addValue(req / risk.getDouble("volatility"));
                s.add(d, covariance(model, d));
            }
            s.check(result, at);
            // the baselines from their definitions, on the model's own windows (the fits' windows) and weights
            for (int b = 1; b <= 2; b++) {
                Stats base = new Stats();
                for (Date d : plan) {
                    JsonPath fit = fitAt(model, d.t());
                    double[][] c = baseline(returns, fit, d.names(), model.equals("e2") ? 30.0 : null, b == 2);
                    double[] w = new double[d.names().size()];
                    java.util.Arrays.fill(w, 1.0 / w.length);
                    double req = 0;
                    for (double x : d.realised()) req += x / w.length;
                    base.equal.addValue(req / Math.sqrt(H * quad(c, w)));
                    base.add(d, c);
                }
                base.check(result, "results[" + (entry.get(model) + b) + "]");
            }
        }
    }

    /** The outcomes of one entry, gathered date by date. */
    private static final class Stats {
        final DescriptiveStatistics equal = new DescriptiveStatistics();
        final Map<String, DescriptiveStatistics> single = new TreeMap<>();
        final DescriptiveStatistics mvZ = new DescriptiveStatistics();
        final DescriptiveStatistics mvReturn = new DescriptiveStatistics();
        double turnover;
        int turnovers;
        Map<String, Double> previous;
        double logLikelihood;
        int dates;

        void add(Date d, double[][] c) {
            int n = d.names().size();
            for (int i = 0; i < n; i++) {
                single.computeIfAbsent(d.names().get(i), k -> new DescriptiveStatistics()).addValue(d.realised()[i] / Math.sqrt(H * c[i][i]));
            }
            RealMatrix cm = new Array2DRowRealMatrix(c);
            RealMatrix inv = new LUDecomposition(cm).getSolver().getInverse();
            double[] v = inv.operate(ones(n));
            double total = 0;
            for (double x : v) total += x;
            Map<String, Double> weights = new HashMap<>();
            double r = 0;
            for (int i = 0; i < n; i++) {
                weights.put(d.names().get(i), v[i] / total);
                r += v[i] / total * d.realised()[i];
            }
            mvReturn.addValue(r);
            mvZ.addValue(r / Math.sqrt(H / total));
            if (previous != null) {
                double sum = 0;
                TreeSet<String> union = new TreeSet<>(weights.keySet());
                union.addAll(previous.keySet());
                for (String k : union) sum += Math.abs(weights.getOrDefault(k, 0.0) - previous.getOrDefault(k, 0.0));
                turnover += sum;
                turnovers++;
            }
            previous = weights;
            logLikelihood += Math.log(new MultivariateNormalDistribution(new double[n], cm.scalarMultiply(H).getData()).density(d.realised()));
            dates++;
        }

        void check(JsonPath result, String at) {
            close(equal.getStandardDeviation(), result.getDouble(at + ".families.equal.bias"), at + " equal bias");
            List<Double> b = new ArrayList<>();
            int inside = 0;
            for (DescriptiveStatistics s : single.values()) {
                if (s.getN() < 2) continue;
                double sd = s.getStandardDeviation();
                b.add(sd);
                double half = Math.sqrt(2.0 / s.getN());
                if (sd >= 1 - half && sd <= 1 + half) inside++;
            }
            DescriptiveStatistics med = new DescriptiveStatistics();
            b.forEach(med::addValue);
            close(med.getPercentile(50), result.getDouble(at + ".families.single.median"), at + " single median");
            assertEquals(b.size(), result.getInt(at + ".families.single.n"), at);
            close((double) inside / b.size(), result.getDouble(at + ".families.single.insideBand"), at + " single inside band");
            close(mvZ.getStandardDeviation(), result.getDouble(at + ".families.minimum-variance.bias"), at + " minimum-variance bias");
            close(mvReturn.getStandardDeviation() * Math.sqrt(252.0 / H),
                    result.getDouble(at + ".families.minimum-variance.realisedVolatility"), at + " realised volatility");
            close(turnover / turnovers, result.getDouble(at + ".families.minimum-variance.turnover"), at + " turnover");
            close(logLikelihood / dates, result.getDouble(at + ".logLikelihood"), at + " log-likelihood");
        }
    }

    private static void close(double expected, double actual, String what) {
        assertEquals(expected, actual, SAME * Math.max(1, Math.abs(expected)), what);
    }

    private static double[] ones(int n) {
        double[] o = new double[n];
        java.util.Arrays.fill(o, 1);
        return o;
    }

    private static double quad(double[][] c, double[] w) {
        double s = 0;
        for (int i = 0; i < w.length; i++) for (int j = 0; j < w.length; j++) s += w[i] * c[i][j] * w[j];
        return s;
    }

    /** The model's covariance of the date's names, as {@code POST /covariance?asOf=t} answers it. */
    private static double[][] covariance(String model, Date d) {
        JsonPath cov = json(given().contentType(ContentType.JSON).body(Map.of("tickers", d.names()))
                .post("/v1/models/" + model + "/covariance?asOf=" + d.t()).then().statusCode(200));
        assertEquals(d.t().toString(), cov.getString("fit.asOf"));
        List<List<Number>> m = cov.getList("matrix");
        double[][] c = new double[m.size()][m.size()];
        for (int i = 0; i < c.length; i++) for (int j = 0; j < c.length; j++) c[i][j] = m.get(i).get(j).doubleValue();
        return c;
    }

    /**
     * The window's sample covariance (docs/design.md section 3: weights summing to 1, weighted means, divisor 1) or its
     * Ledoit-Wolf shrinkage from the published definition (docs/methods.md section 5; each date's term weighted by
     * w_t^2), with a gap taken as the name's mean, as the evaluation documents it.
     */
    private static double[][] baseline(Map<LocalDate, Map<String, Double>> returns, JsonPath fit, List<String> names, Double halfLife,
                                       boolean shrink) {
        LocalDate from = LocalDate.parse(fit.getString("window.from"));
        LocalDate to = LocalDate.parse(fit.getString("window.to"));
        List<LocalDate> window = dates.stream().filter(d -> !d.isBefore(from) && !d.isAfter(to)).toList();
        int t = window.size();
        int n = names.size();
        double[] w = new double[t];
        double sum = 0;
        for (int s = 0; s < t; s++) {
            w[s] = halfLife == null ? 1 : Math.pow(2, -(t - 1 - s) / halfLife);
            sum += w[s];
        }
        for (int s = 0; s < t; s++) w[s] /= sum;
        double[][] x = new double[t][n];
        for (int i = 0; i < n; i++) {
            double mu = 0;
            double seen = 0;
            for (int s = 0; s < t; s++) {
                Double v = returns.get(window.get(s)).get(names.get(i));
                if (v != null) {
                    mu += w[s] * v;
                    seen += w[s];
                }
            }
            mu /= seen;
            for (int s = 0; s < t; s++) {
                Double v = returns.get(window.get(s)).get(names.get(i));
                x[s][i] = v == null ? 0 : v - mu;
            }
        }
        double[][] c = new double[n][n];
        for (int s = 0; s < t; s++) for (int i = 0; i < n; i++) for (int j = 0; j < n; j++) c[i][j] += w[s] * x[s][i] * x[s][j];
        if (!shrink) return c;
        double m = 0;
        for (int i = 0; i < n; i++) m += c[i][i] / n;
        double d2 = 0;
        for (int i = 0; i < n; i++) for (int j = 0; j < n; j++) d2 += Math.pow(c[i][j] - (i == j ? m : 0), 2) / n;
        double b2 = 0;
        for (int s = 0; s < t; s++) for (int i = 0; i < n; i++) for (int j = 0; j < n; j++) {
            b2 += w[s] * w[s] * Math.pow(x[s][i] * x[s][j] - c[i][j], 2) / n;
        }
        double alpha = Math.min(b2, d2) / d2;
        double[][] lw = new double[n][n];
        for (int i = 0; i < n; i++) for (int j = 0; j < n; j++) lw[i][j] = (1 - alpha) * c[i][j] + (i == j ? alpha * m : 0);
        return lw;
    }

    private static List<LocalDate> laterDates(LocalDate t) {
        int i = dates.indexOf(t);
        return dates.subList(i + 1, i + 1 + H);
    }

    private static final Map<String, JsonPath> FITS = new HashMap<>();

    /** The model's ok fit with asOf t (the newest, as asOf queries resolve it), from its fit history. */
    private static JsonPath fitAt(String model, LocalDate t) {
        return FITS.computeIfAbsent(model + "@" + t, k -> {
            JsonPath list = given().get("/v1/models/" + model + "/fits").then().statusCode(200).extract().jsonPath();
            int id = list.getInt("fits.findAll { it.status == 'ok' && it.asOf == '" + t + "' }.id.max()");
            return given().get("/v1/models/" + model + "/fits/" + id).then().statusCode(200).extract().jsonPath();
        });
    }

    private static Map<LocalDate, Map<String, Double>> readBack() {
        JsonPath all = json(given().get("/v1/panels/ep/returns").then().statusCode(200));
        Map<LocalDate, Map<String, Double>> out = new TreeMap<>();
        for (LocalDate d : dates) out.put(d, new HashMap<>());
        List<Map<String, Object>> rows = all.getList("returns");
        for (Map<String, Object> r : rows) {
            out.get(LocalDate.parse((String) r.get("date"))).put((String) r.get("ticker"), ((Number) r.get("value")).doubleValue());
        }
        return out;
    }

    // ---------------------------------------------------------------------------------- errors

    @ParameterizedTest(name = "{0}")
    @CsvSource(delimiter = '|', value = {
        "unknown model            | {'models': ['nope'], 'from': '2024-04-01', 'to': '2024-06-01', 'every': 'week'}                          | 422 | models[0]",
        "from after to            | {'models': ['e1'], 'from': '2024-06-01', 'to': '2024-04-01', 'every': 'week'}                            | 400 | from",
        "no trading date          | {'models': ['e1'], 'from': '2030-01-01', 'to': '2030-02-01', 'every': 'week'}                            | 422 | from",
        "no date with a horizon   | {'models': ['e1'], 'from': '2024-06-12', 'to': '2024-06-14', 'every': 'week', 'horizonDays': 3}          | 422 | from",
        "no date with a window    | {'models': ['e2'], 'from': '2024-01-01', 'to': '2024-02-01', 'every': 'day'}                             | 422 | from",
        "horizon 0                | {'models': ['e1'], 'from': '2024-04-01', 'to': '2024-06-01', 'every': 'week', 'horizonDays': 0}          | 400 | horizonDays",
        "horizon 64               | {'models': ['e1'], 'from': '2024-04-01', 'to': '2024-06-01', 'every': 'week', 'horizonDays': 64}         | 400 | horizonDays",
        "fractional horizon       | {'models': ['e1'], 'from': '2024-04-01', 'to': '2024-06-01', 'every': 'week', 'horizonDays': 1.5}        | 400 | horizonDays",
        "nine models              | {'models': ['a','b','c','d','e','f','g','h','i'], 'from': '2024-04-01', 'to': '2024-06-01', 'every': 'week'} | 400 | models",
        "no models                | {'models': [], 'from': '2024-04-01', 'to': '2024-06-01', 'every': 'week'}                                | 400 | models",
        "a model twice            | {'models': ['e1', 'e1'], 'from': '2024-04-01', 'to': '2024-06-01', 'every': 'week'}                       | 400 | models[1]",
        "different panels         | {'models': ['e1', 'elsewhere'], 'from': '2024-04-01', 'to': '2024-06-01', 'every': 'week'}               | 422 | models",
        "unknown baseline         | {'models': ['e1'], 'from': '2024-04-01', 'to': '2024-06-01', 'every': 'week', 'baselines': ['shrunk']}   | 400 | baselines[0]",
        "too many random names    | {'models': ['e1'], 'from': '2024-04-01', 'to': '2024-06-01', 'every': 'week', 'random': {'count': 2, 'names': 16}} | 422 | random.names",
        "random without count     | {'models': ['e1'], 'from': '2024-04-01', 'to': '2024-06-01', 'every': 'week', 'random': {'names': 2}}    | 400 | random.count",
        "unknown field            | {'models': ['e1'], 'from': '2024-04-01', 'to': '2024-06-01', 'every': 'week', 'horizon': 5}              | 400 | horizon",
        "unknown every            | {'models': ['e1'], 'from': '2024-04-01', 'to': '2024-06-01', 'every': 'fortnight'}                       | 400 | every",
        "no every                 | {'models': ['e1'], 'from': '2024-04-01', 'to': '2024-06-01'}                                             | 400 | every",
        "bad date                 | {'models': ['e1'], 'from': '2024-02-30', 'to': '2024-06-01', 'every': 'week'}                            | 400 | from",
    })
    void bad_requests_are_4xx_problems_naming_the_field_and_start_nothing(String name, String body, int status, String field) {
        int jobs = given().get("/v1/jobs").then().extract().path("jobs.size()");
        given().contentType(ContentType.JSON).body(body.replace('\'', '"')).post("/v1/evaluations").then()
                .statusCode(status).contentType(startsWith(Problem.CONTENT_TYPE)).body("errors.field", hasItem(field));
        given().get("/v1/jobs").then().body("jobs", hasSize(jobs));
    }

    @Test
    void unknown_evaluations_are_404_and_an_unfinished_ones_series_is_409() throws InterruptedException {
        given().get("/v1/evaluations/999999").then().statusCode(404).contentType(startsWith(Problem.CONTENT_TYPE));
        given().get("/v1/evaluations/999999/series").then().statusCode(404);
        given().get("/v1/evaluations/x").then().statusCode(400).body("errors.field", contains("id"));
        // a backfill job is not an evaluation
        long backfill = BusyJob.start();
        given().get("/v1/evaluations/" + backfill).then().statusCode(404);
        // queued behind it, then cancelled: it never gets a series
        long queued = given().contentType(ContentType.JSON).body("{\"models\": [\"e1\"], \"from\": \"" + dates.get(60) + "\", \"to\": \""
                + dates.get(110) + "\", \"every\": \"day\"}").post("/v1/evaluations").then().statusCode(202).extract().jsonPath().getLong("id");
        given().delete("/v1/jobs/" + queued).then().statusCode(200).body("state", equalTo("cancelled"));
        given().get("/v1/evaluations/" + queued + "/series").then().statusCode(409).contentType(startsWith(Problem.CONTENT_TYPE));
        given().get("/v1/evaluations/" + queued).then().statusCode(200).body("state", equalTo("cancelled")).body("results", hasSize(0));
        assertTrue(app.jobs().runner().awaitFinished(backfill, Duration.ofMinutes(2)).isPresent());
    }
}
