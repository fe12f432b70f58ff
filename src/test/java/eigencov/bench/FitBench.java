package eigencov.bench;

import eigencov.math.FactorFitter;
import eigencov.math.FactorModel;
import eigencov.math.FactorRule;
import eigencov.math.FirstFactorBeta;
import eigencov.math.FitOptions;
import eigencov.math.FitResult;
import eigencov.math.Kernels;
import eigencov.math.ReturnPanel;
import eigencov.math.RiskCalculator;
import eigencov.math.ShortHistoryFit;
import java.io.IOException;
import java.lang.management.ManagementFactory;
import java.nio.ByteBuffer;
import java.nio.ByteOrder;
import java.nio.channels.FileChannel;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardOpenOption;
import java.time.LocalDate;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Random;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;

/**
 * Benchmark harness for issue 3 (run by scripts/bench-fit; prints figures, asserts nothing).
 * Synthetic panels with a planted 20-factor structure, full fits with all non-zero eigenvalues,
 * numpy's Gram + eigh + map-back and thin SVD on the same demeaned matrix when python3 has numpy.
 */
public final class FitBench {

    private static final int K_FACTORS = 20;
    /**
     * Warm-up per shape: C2 compiles the kernels after some thousand loop back-edges, and a fit's big
     * methods are first run by on-stack replacement; two warm-up fits left the medians 1.5x too high.
     */
    private static final int WARMUP_FITS = 5;
    private static final long WARMUP_NANOS = 3_000_000_000L;

    private FitBench() {
    }

    public static void main(String[] args) throws Exception {
        if (args.length > 0 && args[0].equals("short-history")) {
            shortHistory(args.length > 1 ? Integer.parseInt(args[1]) : 15);
            return;
        }
        int reps = args.length > 0 ? Integer.parseInt(args[0]) : 15;
        int[][] shapes = {{252, 500}, {504, 3000}, {756, 3000}, {504, 6000}};
        int threads = Runtime.getRuntime().availableProcessors();
        ExecutorService pool = Executors.newFixedThreadPool(threads, r -> {
            Thread t = new Thread(r, "bench-fit");
            t.setDaemon(true);
            return t;
        });
        boolean numpy = hasNumpy();
        System.out.println("alloc MB = bytes allocated by all threads during one fit (upper bound on peak extra "
                + "memory; the input panel itself is T x K x 8 bytes)");
        System.out.printf("eigencov fit benchmark: %d threads, %d timed fits per shape (after at least %d warm-up fits "
                + "and %.0f s, for the JIT), k = %d, numpy %s, %s%n", threads, reps, WARMUP_FITS, WARMUP_NANOS / 1e9,
                K_FACTORS, numpy ? "present" : "absent", Kernels.description());
        System.out.println("cpu ms = process CPU time per fit, all threads (less sensitive than wall time to other "
                + "load on the machine); np cpu likewise for numpy's Gram route");
        System.out.printf("%-12s %9s %9s %9s %9s %11s %11s %10s %9s %9s %9s%n", "T x K", "fit ms", "min ms", "cpu ms",
                "alloc MB", "np gram ms", "np cpu ms", "np svd ms", "fit/gram", "cpu/cpu", "fit/svd");
        FactorFitter fitter = new FactorFitter(pool);
        FitOptions options = FitOptions.of(new FactorRule.Fixed(K_FACTORS), 0.9);
        FitResult keep = null;
        for (int[] shape : shapes) {
            int t = shape[0];
            int k = shape[1];
            ReturnPanel panel = panel(t, k, 42L + t + k);
            long warm = System.nanoTime();
            for (int w = 0; w < WARMUP_FITS || System.nanoTime() - warm < WARMUP_NANOS; w++) {
                fitter.fit(panel, options, null);
            }
            double[] ms = new double[reps];
            long cpu0 = processCpuNanos();
            for (int r = 0; r < reps; r++) {
                long s = System.nanoTime();
                FitResult res = fitter.fit(panel, options, null);
                ms[r] = (System.nanoTime() - s) / 1e6;
                if (t == 504 && k == 3000) {
                    keep = res;
                }
            }
            double cpuMs = (processCpuNanos() - cpu0) / 1e6 / reps;
            double peak = allocatedMegabytes(() -> fitter.fit(panel, options, null));
            double med = median(ms);
            double[] np = numpy ? numpyTimes(panel, Math.max(3, reps / 2)) : null;
            System.out.printf("%-12s %9.1f %9.1f %9.1f %9.1f %11s %11s %10s %9s %9s %9s%n", t + " x " + k, med,
                    Arrays.stream(ms).min().orElse(0), cpuMs, peak,
                    np == null ? "-" : String.format("%.1f", np[0]), np == null ? "-" : String.format("%.1f", np[2]),
                    np == null ? "-" : String.format("%.1f", np[1]),
                    np == null ? "-" : String.format("%.2f", med / np[0]),
                    np == null ? "-" : String.format("%.2f", cpuMs / np[2]),
                    np == null ? "-" : String.format("%.2f", med / np[1]));
        }
        riskQueries(keep);
        pool.shutdownNow();
    }

    /**
     * Short-history names (docs/design.md section 6): T = 504, K = 3,000 of which every tenth name (300, 10 %) has
     * only its last 200 returns (below 90 % coverage). The same panel is refitted with the option off (those names
     * excluded) and on (minObservations 60: they get exposures by least squares on the factor returns), alternately,
     * so that both see the same load on the machine. Target (issue 12): on within 1.2x of off.
     */
    private static void shortHistory(int reps) {
        int dates = 504;
        int tickers = 3000;
        int shortDates = 200;
        ExecutorService pool = Executors.newFixedThreadPool(Runtime.getRuntime().availableProcessors(), r -> {
            Thread t = new Thread(r, "bench-fit");
            t.setDaemon(true);
            return t;
        });
        ReturnPanel full = panel(dates, tickers, 42L + dates + tickers);
        double[] v = full.values();
        int cut = 0;
        for (int i = 0; i < tickers; i += 10) {
            cut++;
            for (int t = 0; t < dates - shortDates; t++) v[t * tickers + i] = Double.NaN;
        }
        ReturnPanel panel = new ReturnPanel(full.dates(), full.tickers(), v);
        FactorFitter fitter = new FactorFitter(pool);
        FitOptions off = FitOptions.of(new FactorRule.Fixed(K_FACTORS), 0.9);
        FitOptions on = off.withShortHistory(60);
        long warm = System.nanoTime();
        for (int w = 0; w < WARMUP_FITS || System.nanoTime() - warm < WARMUP_NANOS; w++) {
            fitter.fit(panel, off, null);
            fitter.fit(panel, on, null);
        }
        double[] msOff = new double[reps];
        double[] msOn = new double[reps];
        double[] msStep = new double[reps];
        FitResult last = null;
        for (int r = 0; r < reps; r++) {
            long s = System.nanoTime();
            FitResult main = fitter.fit(panel, off, null);
            msOff[r] = (System.nanoTime() - s) / 1e6;
            s = System.nanoTime();
            last = fitter.fit(panel, on, null);
            msOn[r] = (System.nanoTime() - s) / 1e6;
            s = System.nanoTime();
            ShortHistoryFit.extend(main, panel, on);
            msStep[r] = (System.nanoTime() - s) / 1e6;
        }
        System.out.printf("short-history refit benchmark: T = %d, K = %d of which %d (%.0f %%) with the last %d dates only, "
                + "k = %d, %d threads, %d timed fits each, %s%n", dates, tickers, cut, 100.0 * cut / tickers, shortDates, K_FACTORS,
                Runtime.getRuntime().availableProcessors(), reps, Kernels.description());
        System.out.printf("option off (universe %d, %d excluded): median %.1f ms, min %.1f ms%n", last.model().size(), cut,
                median(msOff), Arrays.stream(msOff).min().orElse(0));
        System.out.printf("option on (universe %d + %d short-history names): median %.1f ms, min %.1f ms%n", last.model().size(),
                last.shortHistory().size(), median(msOn), Arrays.stream(msOn).min().orElse(0));
        System.out.printf("the short-history step alone: median %.1f ms; on / off = %.3f (target <= 1.2)%n", median(msStep),
                median(msOn) / median(msOff));
        pool.shutdownNow();
    }

    private static void riskQueries(FitResult fit) {
        FactorModel model = fit.model();
        double[] betas = FirstFactorBeta.betas(fit, model);
        int n = model.size();
        Random r = new Random(7);
        int[] idx = new int[n];
        double[] w = new double[n];
        for (int i = 0; i < n; i++) {
            idx[i] = i;
            w[i] = r.nextDouble() / n;
        }
        int reps = 2000;
        double[] us = new double[reps];
        double[] usVol = new double[reps];
        double sink = 0;
        for (int rep = 0; rep < reps; rep++) {
            long s = System.nanoTime();
            sink += RiskCalculator.portfolio(model, idx, w, null, null, 1.0, betas).volatility();
            us[rep] = (System.nanoTime() - s) / 1e3;
            s = System.nanoTime();
            sink += RiskCalculator.volatility(model, idx, w, 1.0);
            usVol[rep] = (System.nanoTime() - s) / 1e3;
        }
        int[] sub = new int[500];
        for (int i = 0; i < 500; i++) {
            sub[i] = i * (n / 500);
        }
        double[] ms = new double[200];
        for (int rep = 0; rep < ms.length; rep++) {
            long s = System.nanoTime();
            sink += RiskCalculator.covariance(model, sub, 1.0, false)[1];
            ms[rep] = (System.nanoTime() - s) / 1e6;
        }
        System.out.printf("portfolio risk, %d names, k = %d: full decomposition median %.1f us, volatility only "
                + "median %.1f us%n", n, model.factors(), median(Arrays.copyOfRange(us, reps / 2, reps)),
                median(Arrays.copyOfRange(usVol, reps / 2, reps)));
        System.out.printf("covariance submatrix 500 x 500: median %.2f ms (checksum %.3e)%n",
                median(Arrays.copyOfRange(ms, ms.length / 2, ms.length)), sink);
    }

    /** Panel from a planted model: r_t = B f_t + e_t, 20 factors with decaying volatility, noise 1-2 %. */
    static ReturnPanel panel(int dates, int tickers, long seed) {
        Random r = new Random(seed);
        double[] b = new double[tickers * K_FACTORS];
        for (int i = 0; i < b.length; i++) {
            b[i] = r.nextGaussian() + (i % K_FACTORS == 0 ? 1 : 0);
        }
        double[] vol = new double[tickers];
        for (int i = 0; i < tickers; i++) {
            vol[i] = 0.01 + 0.01 * r.nextDouble();
        }
        double[] v = new double[dates * tickers];
        double[] f = new double[K_FACTORS];
        for (int t = 0; t < dates; t++) {
            for (int c = 0; c < K_FACTORS; c++) {
                f[c] = r.nextGaussian() * 0.01 / (1 + c);
            }
            for (int i = 0; i < tickers; i++) {
                double s = 0;
                for (int c = 0; c < K_FACTORS; c++) {
                    s += b[i * K_FACTORS + c] * f[c];
                }
                v[t * tickers + i] = s + vol[i] * r.nextGaussian();
            }
        }
        List<LocalDate> d = new ArrayList<>();
        LocalDate day = LocalDate.of(2020, 1, 1);
        for (int t = 0; t < dates; t++) {
            d.add(day.plusDays(t));
        }
        List<String> names = new ArrayList<>();
        for (int i = 0; i < tickers; i++) {
            names.add("SYN" + i);
        }
        return new ReturnPanel(d, names, v);
    }

    private static double median(double[] x) {
        double[] s = x.clone();
        Arrays.sort(s);
        int n = s.length;
        return n % 2 == 1 ? s[n / 2] : 0.5 * (s[n / 2 - 1] + s[n / 2]);
    }

    /**
     * Bytes allocated by all threads (caller and pool) during one run: every array a fit creates is
     * counted once, so this is an upper bound on the peak extra memory of the fit.
     */
    private static double allocatedMegabytes(Runnable run) {
        com.sun.management.ThreadMXBean tb = (com.sun.management.ThreadMXBean) ManagementFactory.getThreadMXBean();
        long[] ids = tb.getAllThreadIds();
        long[] before = tb.getThreadAllocatedBytes(ids);
        run.run();
        long[] after = tb.getThreadAllocatedBytes(ids);
        long sum = 0;
        for (int i = 0; i < ids.length; i++) {
            if (before[i] >= 0 && after[i] >= before[i]) {
                sum += after[i] - before[i];
            }
        }
        return sum / 1048576.0;
    }

    private static boolean hasNumpy() {
        try {
            Process p = new ProcessBuilder("python3", "-c", "import numpy").redirectErrorStream(true).start();
            p.getInputStream().readAllBytes();
            return p.waitFor() == 0;
        } catch (IOException e) {
            return false;
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            return false;
        }
    }

    private static long processCpuNanos() {
        return ((com.sun.management.OperatingSystemMXBean) ManagementFactory.getOperatingSystemMXBean())
                .getProcessCpuTime();
    }

    /** numpy {median gram + eigh + map back ms, median thin svd ms, gram route cpu ms per run} on the equal-weight demeaned matrix. */
    private static double[] numpyTimes(ReturnPanel panel, int reps) throws IOException, InterruptedException {
        int t = panel.rows();
        int k = panel.cols();
        double[] v = panel.values();
        for (int i = 0; i < k; i++) {
            double mu = 0;
            for (int s = 0; s < t; s++) {
                mu += v[s * k + i];
            }
            mu /= t;
            for (int s = 0; s < t; s++) {
                v[s * k + i] -= mu;
            }
        }
        Path file = Files.createTempFile("bench-fit", ".f64");
        try {
            ByteBuffer buf = ByteBuffer.allocate(v.length * 8).order(ByteOrder.LITTLE_ENDIAN);
            buf.asDoubleBuffer().put(v);
            try (FileChannel ch = FileChannel.open(file, StandardOpenOption.WRITE)) {
                ch.write(buf);
            }
            String script = String.join("\n",
                    "import sys, time, numpy as np",
                    "T, K, k, reps = " + t + ", " + k + ", " + K_FACTORS + ", " + reps,
                    "X = np.fromfile(sys.argv[1], dtype='<f8').reshape(T, K) / np.sqrt(T)",
                    "def gram():",
                    "    G = X @ X.T",
                    "    w, U = np.linalg.eigh(G)",
                    "    V = X.T @ U[:, -k:] / np.sqrt(w[-k:])",
                    "    return V",
                    "def svd():",
                    "    return np.linalg.svd(X, full_matrices=False)",
                    "def med(f, n):",
                    "    f()",
                    "    ts = []",
                    "    c0 = time.process_time()",
                    "    for _ in range(n):",
                    "        s = time.perf_counter(); f(); ts.append((time.perf_counter() - s) * 1e3)",
                    "    return float(np.median(ts)), (time.process_time() - c0) * 1e3 / n",
                    "g, gc = med(gram, reps)",
                    "print(g, med(svd, 2)[0], gc)");
            Process p = new ProcessBuilder("python3", "-c", script, file.toString()).redirectErrorStream(true).start();
            String out = new String(p.getInputStream().readAllBytes()).trim();
            if (p.waitFor() != 0) {
                throw new IOException("numpy timing failed: " + out);
            }
            String[] parts = out.split("\\s+");
            return new double[] {Double.parseDouble(parts[0]), Double.parseDouble(parts[1]),
                Double.parseDouble(parts[2])};
        } finally {
            Files.deleteIfExists(file);
        }
    }
}
