package eigencov.service;

import eigencov.math.AlignmentReport;
import eigencov.math.Basis;
import eigencov.math.Exclusion;
import eigencov.math.FactorCountReport;
import eigencov.math.FactorModel;
import eigencov.math.FitResult;
import eigencov.math.ImputationReport;

import java.time.DayOfWeek;
import java.time.Instant;
import java.time.LocalDate;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.Random;

/** Served fits built from factor models constructed in tests (no fitting involved). */
public final class TestFits {
    private TestFits() {
    }

    /**
     * Toy model M of docs/methods.md (section 0, check values in section 9):
     * B = [[1.0,0.5],[0.8,-0.3],[1.2,0.1]], F = diag(0.04,0.01), D = diag(0.02,0.03,0.05), tickers AAA, BBB, CCC.
     */
    public static FactorModel toyModelM() {
        return new FactorModel(List.of("AAA", "BBB", "CCC"), 2,
                new double[]{1.0, 0.5, 0.8, -0.3, 1.2, 0.1},
                new double[]{0.04, 0, 0, 0.01},
                new double[]{0.02, 0.03, 0.05});
    }

    /**
     * A seeded synthetic model: K tickers {@code prefix0000..}, k factors with orthonormal
     * exposure columns (Gram-Schmidt of Gaussian columns), factor variances decreasing from 4e-4,
     * specific variances in [5e-5, 4e-4]; with {@code rotated} F gets off-diagonal covariances too.
     */
    public static FactorModel synthetic(String prefix, int K, int k, long seed, boolean rotated) {
        Random rnd = new Random(seed);
        List<String> tickers = new ArrayList<>(K);
        for (int i = 0; i < K; i++) tickers.add(String.format("%s%04d", prefix, i));
        double[] b = new double[K * k];
        for (int j = 0; j < k; j++) {
            for (int i = 0; i < K; i++) b[i * k + j] = rnd.nextGaussian();
            for (int p = 0; p < j; p++) {
                double dot = 0;
                for (int i = 0; i < K; i++) dot += b[i * k + j] * b[i * k + p];
                for (int i = 0; i < K; i++) b[i * k + j] -= dot * b[i * k + p];
            }
            double norm = 0;
            for (int i = 0; i < K; i++) norm += b[i * k + j] * b[i * k + j];
            norm = Math.sqrt(norm);
            for (int i = 0; i < K; i++) b[i * k + j] /= norm;
        }
        double[] f = new double[k * k];
        for (int j = 0; j < k; j++) f[j * k + j] = 4e-4 * K / (j + 1.0) / (j + 1.0);
        if (rotated) {
            for (int j = 0; j + 1 < k; j++) {
                double c = 0.3 * Math.sqrt(f[j * k + j] * f[(j + 1) * k + j + 1]);
                f[j * k + j + 1] = c;
                f[(j + 1) * k + j] = c;
            }
        }
        double[] d = new double[K];
        for (int i = 0; i < K; i++) d[i] = 5e-5 + 3.5e-4 * rnd.nextDouble();
        return new FactorModel(tickers, k, b, f, d);
    }

    /**
     * A served fit of {@code model}: window of {@code days} weekdays ending at {@code asOf}, seeded
     * factor returns, eigenvalues = the diagonal of F followed by three smaller ones, shares of
     * their sum plus the total specific variance.
     */
    public static ServedFit served(long id, String modelName, LocalDate asOf, FactorModel model, int days,
                                   List<Exclusion> excluded, long seed) {
        int k = model.factors();
        List<LocalDate> dates = new ArrayList<>(days);
        LocalDate d = asOf;
        while (dates.size() < days) {
            if (d.getDayOfWeek() != DayOfWeek.SATURDAY && d.getDayOfWeek() != DayOfWeek.SUNDAY) dates.add(0, d);
            d = d.minusDays(1);
        }
        Random rnd = new Random(seed);
        double[] fr = new double[days * k];
        for (int t = 0; t < days; t++) {
            for (int j = 0; j < k; j++) fr[t * k + j] = rnd.nextGaussian() * Math.sqrt(Math.abs(model.factorCov(j, j)));
        }
        double[] eig = new double[k + 3];
        double total = 0;
        for (int j = 0; j < k; j++) eig[j] = model.factorCov(j, j);
        for (int j = 0; j < 3; j++) eig[k + j] = eig[k - 1] * (0.5 - 0.1 * j);
        for (double e : eig) total += e;
        for (int i = 0; i < model.size(); i++) total += model.specificVariance(i);
        double[] share = new double[eig.length];
        for (int j = 0; j < eig.length; j++) share[j] = eig[j] / total;
        FitResult r = new FitResult(model, dates, eig, share, new double[model.size()], fr, excluded,
                new FactorCountReport("fixed", k, k, "none", k, new double[0], Map.of()),
                ImputationReport.none(1e-6, 100),
                new AlignmentReport(AlignmentReport.FIRST_FIT, 0, List.of(), new double[0], new int[0], List.of(), List.of(), 1.0),
                days, 0L, eig.length, total, Basis.COVARIANCE);
        return new ServedFit(new FitRef(id, modelName, asOf, Instant.parse(asOf + "T22:00:00Z")), r);
    }
}
