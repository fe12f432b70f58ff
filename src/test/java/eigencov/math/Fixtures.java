package eigencov.math;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.io.BufferedReader;
import java.io.IOException;
import java.io.InputStream;
import java.io.InputStreamReader;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.time.LocalDate;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Random;
import java.util.TreeMap;
import org.ejml.data.DMatrixRMaj;
import org.ejml.dense.row.CommonOps_DDRM;
import org.ejml.dense.row.SingularOps_DDRM;
import org.ejml.dense.row.factory.DecompositionFactory_DDRM;
import org.ejml.interfaces.decomposition.SingularValueDecomposition_F64;

/** Test data: reference datasets from src/test/resources/reference, planted panels, EJML helpers. */
final class Fixtures {

    private static final ObjectMapper JSON = new ObjectMapper();

    private Fixtures() {
    }

    static JsonNode json(String dataset, String file) {
        try (InputStream in = resource(dataset + "/" + file)) {
            return JSON.readTree(in);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    private static InputStream resource(String path) {
        InputStream in = Fixtures.class.getResourceAsStream("/reference/" + path);
        if (in == null) {
            throw new IllegalStateException("missing test resource reference/" + path);
        }
        return in;
    }

    /** Long CSV {@code date,asset,return} as a panel with the given ticker order (NaN where absent). */
    static ReturnPanel panel(String dataset, String file, List<String> assets) {
        TreeMap<LocalDate, Map<String, Double>> rows = new TreeMap<>();
        try (BufferedReader r = new BufferedReader(new InputStreamReader(resource(dataset + "/" + file),
                StandardCharsets.UTF_8))) {
            String line = r.readLine();
            while ((line = r.readLine()) != null) {
                String[] f = line.split(",");
                rows.computeIfAbsent(LocalDate.parse(f[0]), d -> new HashMap<>()).put(f[1], Double.parseDouble(f[2]));
            }
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
        int k = assets.size();
        double[] v = new double[rows.size() * k];
        Arrays.fill(v, Double.NaN);
        int t = 0;
        for (Map<String, Double> row : rows.values()) {
            for (int i = 0; i < k; i++) {
                Double x = row.get(assets.get(i));
                if (x != null) {
                    v[t * k + i] = x;
                }
            }
            t++;
        }
        return new ReturnPanel(new ArrayList<>(rows.keySet()), assets, v);
    }

    static double[] doubles(JsonNode node) {
        double[] d = new double[node.size()];
        for (int i = 0; i < d.length; i++) {
            d[i] = node.get(i).asDouble();
        }
        return d;
    }

    static List<String> strings(JsonNode node) {
        List<String> s = new ArrayList<>();
        node.forEach(n -> s.add(n.asText()));
        return s;
    }

    /** Row-major flattening of a JSON matrix. */
    static double[] matrix(JsonNode node) {
        int r = node.size();
        int c = node.get(0).size();
        double[] m = new double[r * c];
        for (int i = 0; i < r; i++) {
            for (int j = 0; j < c; j++) {
                m[i * c + j] = node.get(i).get(j).asDouble();
            }
        }
        return m;
    }

    static List<LocalDate> days(int n) {
        List<LocalDate> d = new ArrayList<>();
        LocalDate start = LocalDate.of(2021, 1, 4);
        for (int t = 0; t < n; t++) {
            d.add(start.plusDays(t));
        }
        return d;
    }

    static List<String> names(int n) {
        List<String> s = new ArrayList<>();
        for (int i = 0; i < n; i++) {
            s.add("ZQ" + i);
        }
        return s;
    }

    /** Row-major T x K panel from values. */
    static ReturnPanel panel(int dates, int tickers, double[] values) {
        return new ReturnPanel(days(dates), names(tickers), values);
    }

    /**
     * Planted model X = F L' + E (docs/methods.md section 2 property): F (T x r), L (K x r), E all
     * N(0, noise^2); returns {panel values (T x K), loadings L (K x r row-major)}.
     */
    static double[][] planted(int dates, int tickers, int r, double noise, long seed) {
        Random rnd = new Random(seed);
        double[] l = new double[tickers * r];
        for (int x = 0; x < l.length; x++) {
            l[x] = rnd.nextGaussian();
        }
        double[] v = new double[dates * tickers];
        double[] f = new double[r];
        for (int t = 0; t < dates; t++) {
            for (int c = 0; c < r; c++) {
                f[c] = rnd.nextGaussian();
            }
            for (int i = 0; i < tickers; i++) {
                double s = 0;
                for (int c = 0; c < r; c++) {
                    s += f[c] * l[i * r + c];
                }
                v[t * tickers + i] = s + noise * rnd.nextGaussian();
            }
        }
        return new double[][] {v, l};
    }

    /**
     * Largest principal angle (degrees) between the column spans of A (n x p) and B (n x q), both
     * row-major, computed as in Bjorck and Golub (1973): cosines are the singular values of Qa'Qb.
     */
    static double largestPrincipalAngleDegrees(double[] a, int n, int p, double[] b, int q) {
        DMatrixRMaj qa = orth(new DMatrixRMaj(n, p, true, a));
        DMatrixRMaj qb = orth(new DMatrixRMaj(n, q, true, b));
        DMatrixRMaj c = new DMatrixRMaj(p, q);
        CommonOps_DDRM.multTransA(qa, qb, c);
        SingularValueDecomposition_F64<DMatrixRMaj> svd = DecompositionFactory_DDRM.svd(p, q, false, false, true);
        if (!svd.decompose(c)) {
            throw new IllegalStateException("svd failed");
        }
        double[] s = svd.getSingularValues();
        double min = 1;
        for (int i = 0; i < Math.min(p, q); i++) {
            min = Math.min(min, s[i]);
        }
        return Math.toDegrees(Math.acos(Math.min(1, min)));
    }

    private static DMatrixRMaj orth(DMatrixRMaj a) {
        SingularValueDecomposition_F64<DMatrixRMaj> svd = DecompositionFactory_DDRM.svd(a.numRows, a.numCols, true,
                false, true);
        if (!svd.decompose(a.copy())) {
            throw new IllegalStateException("svd failed");
        }
        DMatrixRMaj u = svd.getU(null, false);
        SingularOps_DDRM.descendingOrder(u, false, svd.getSingularValues(), Math.min(a.numRows, a.numCols), null,
                false);
        DMatrixRMaj out = new DMatrixRMaj(a.numRows, a.numCols);
        CommonOps_DDRM.extract(u, 0, a.numRows, 0, a.numCols, out, 0, 0);
        return out;
    }

    /** The full model covariance B F B' + D for all tickers (test sizes only). */
    static double[] modelCovariance(FactorModel m) {
        int[] all = new int[m.size()];
        for (int i = 0; i < all.length; i++) {
            all[i] = i;
        }
        return RiskCalculator.covariance(m, all, 1.0, false);
    }

    /**
     * Each row's first-factor beta for a covariance-basis model without short-history names: the
     * first factor's portfolio is column 1 of B scaled to sum to 1 (docs/design.md section 6).
     */
    static double[] betas(FactorModel m) {
        double[] p = new double[m.size()];
        double sum = 0;
        for (int i = 0; i < p.length; i++) {
            p[i] = m.exposure(i, 0);
            sum += p[i];
        }
        for (int i = 0; i < p.length; i++) p[i] /= sum;
        return FirstFactorBeta.betas(m, p);
    }

    static double maxAbs(double[] x) {
        double m = 0;
        for (double v : x) {
            m = Math.max(m, Math.abs(v));
        }
        return m;
    }
}
