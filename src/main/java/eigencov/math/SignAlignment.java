package eigencov.math;

import java.util.ArrayList;
import java.util.List;

/**
 * Orients factors (docs/design.md section 3, docs/methods.md section 8). First fit: each eigenvector gets
 * a positive sum (tie: its largest-|.| entry positive). Later fits: each new factor is matched to
 * the previous factor with the largest |cosine| over the common tickers (greedy assignment,
 * largest first) and takes the sign of that inner product. Only signs change; factor order stays
 * by descending eigenvalue, and swaps are reported, so no risk number changes.
 */
final class SignAlignment {

    private SignAlignment() {
    }

    /**
     * Flips rows of {@code v} (k x K eigenvectors, rows) in place and returns the report.
     *
     * @param exposureScale per ticker multiplier turning v into exposures (sigma_i for the correlation
     *                      basis), or null for 1
     */
    static AlignmentReport align(double[] v, int k, List<String> tickers, double[] exposureScale,
                                 FactorModel previous) {
        int n = tickers.size();
        List<Integer> flipped = new ArrayList<>();
        if (previous == null) {
            return firstFit(v, k, n, flipped, 0);
        }
        int[] newPos = new int[n];
        int[] oldPos = new int[n];
        int common = 0;
        for (int i = 0; i < n; i++) {
            int p = previous.indexOf(tickers.get(i));
            if (p >= 0) {
                newPos[common] = i;
                oldPos[common] = p;
                common++;
            }
        }
        if (common == 0) {
            return firstFit(v, k, n, flipped, 0);
        }
        int ko = previous.factors();
        double[] cos = new double[k * ko];
        double[] nn = new double[k];
        double[] no = new double[ko];
        for (int x = 0; x < common; x++) {
            int i = newPos[x];
            double sc = exposureScale == null ? 1 : exposureScale[i];
            int p = oldPos[x];
            for (int o = 0; o < ko; o++) {
                double bo = previous.exposure(p, o);
                no[o] += bo * bo;
            }
            for (int c = 0; c < k; c++) {
                double bn = v[c * n + i] * sc;
                nn[c] += bn * bn;
                for (int o = 0; o < ko; o++) {
                    cos[c * ko + o] += bn * previous.exposure(p, o);
                }
            }
        }
        double overlap = 0;
        for (int c = 0; c < k; c++) {
            for (int o = 0; o < ko; o++) {
                double den = Math.sqrt(nn[c] * no[o]);
                double value = den > 0 ? cos[c * ko + o] / den : 0;
                cos[c * ko + o] = value;
                overlap += value * value;
            }
        }
        overlap /= Math.min(k, ko);
        int[] matched = new int[k];
        java.util.Arrays.fill(matched, -1);
        boolean[] usedOld = new boolean[ko];
        for (int round = 0; round < Math.min(k, ko); round++) {
            int bc = -1;
            int bo = -1;
            double best = -1;
            for (int c = 0; c < k; c++) {
                if (matched[c] >= 0) {
                    continue;
                }
                for (int o = 0; o < ko; o++) {
                    double a = Math.abs(cos[c * ko + o]);
                    if (!usedOld[o] && a > best) {
                        best = a;
                        bc = c;
                        bo = o;
                    }
                }
            }
            matched[bc] = bo;
            usedOld[bo] = true;
        }
        double[] cosines = new double[k];
        List<Integer> swaps = new ArrayList<>();
        List<Integer> weak = new ArrayList<>();
        for (int c = 0; c < k; c++) {
            int o = matched[c];
            if (o < 0) {
                if (orientBySum(v, c, n)) {
                    flipped.add(c);
                }
                weak.add(c);
                continue;
            }
            double value = cos[c * ko + o];
            cosines[c] = Math.abs(value);
            if (value < 0) {
                flip(v, c, n);
                flipped.add(c);
            }
            if (o != c) {
                swaps.add(c);
            }
            if (Math.abs(value) < AlignmentReport.WEAK_COSINE) {
                weak.add(c);
            }
        }
        return new AlignmentReport(AlignmentReport.PREVIOUS_FIT, common, flipped, cosines, matched, swaps, weak,
                overlap);
    }

    private static AlignmentReport firstFit(double[] v, int k, int n, List<Integer> flipped, int common) {
        for (int c = 0; c < k; c++) {
            if (orientBySum(v, c, n)) {
                flipped.add(c);
            }
        }
        int[] none = new int[k];
        java.util.Arrays.fill(none, -1);
        return new AlignmentReport(AlignmentReport.FIRST_FIT, common, flipped, new double[0], none, List.of(),
                List.of(), 0);
    }

    /** Makes sum_i v_ci > 0 (tie: largest-|.| entry positive); returns whether it flipped. */
    static boolean orientBySum(double[] v, int c, int n) {
        int o = c * n;
        double s = 0;
        double big = 0;
        for (int i = 0; i < n; i++) {
            s += v[o + i];
            if (Math.abs(v[o + i]) > Math.abs(big)) {
                big = v[o + i];
            }
        }
        // a sum within rounding of zero is a tie
        double scale = 0;
        for (int i = 0; i < n; i++) {
            scale += Math.abs(v[o + i]);
        }
        boolean negative = Math.abs(s) <= 1e-12 * scale ? big < 0 : s < 0;
        if (negative) {
            flip(v, c, n);
        }
        return negative;
    }

    private static void flip(double[] v, int c, int n) {
        int o = c * n;
        for (int i = 0; i < n; i++) {
            v[o + i] = -v[o + i];
        }
    }
}
