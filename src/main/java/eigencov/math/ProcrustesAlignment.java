package eigencov.math;

import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.RealMatrix;
import org.apache.commons.math3.linear.SingularValueDecomposition;

import java.util.List;

/**
 * Orthogonal Procrustes alignment of a new fit's factors to the previous fit's (docs/methods.md section
 * 8; Schönemann 1966): R = argmin over orthogonal R of ||B_new[c] R - B_old[c]||_F on the common
 * tickers c, from the SVD B_new[c]' B_old[c] = P S Q', R = P Q'. Applied to all names as B R, to the
 * factor covariance as R' F R (no longer diagonal) and to factor returns as f_t' R. R is orthogonal,
 * so B F B' and every risk number are unchanged; only the factor coordinates follow the previous fit.
 *
 * <p>Applied only when the new and previous fits have the same k, at least k common tickers and a
 * subspace overlap of at least {@link #MIN_OVERLAP} (common practice: below that the factors are
 * not the same ones turned, and the fit is reported as a factor break instead).
 */
final class ProcrustesAlignment {
    /** Least subspace overlap for a rotation (docs/methods.md section 8 suggests 0.5; practice). */
    static final double MIN_OVERLAP = 0.5;

    private ProcrustesAlignment() {
    }

    /**
     * Rotates {@code b} (K x k exposures), {@code f} (k x k factor covariance, diagonal: the fit's
     * eigenvalues) and {@code returns} (T x k factor returns) in place when the conditions hold, and
     * reports what it did.
     */
    static Rotation align(double[] b, double[] f, double[] returns, int k, List<String> universe, FactorModel previous,
                          AlignmentReport signs, Parallel par) {
        if (previous == null) return Rotation.skipped("first fit");
        if (previous.factors() != k) return Rotation.skipped("k changed from " + previous.factors() + " to " + k);
        if (signs.commonTickers() < k) return Rotation.skipped(signs.commonTickers() + " common tickers, fewer than the " + k + " factors");
        if (!(signs.overlap() >= MIN_OVERLAP)) {
            return Rotation.skipped(String.format(java.util.Locale.ROOT, "factor break: subspace overlap %.3f below %.1f",
                    signs.overlap(), MIN_OVERLAP));
        }
        // M = B_new[c]' B_old[c]
        double[] m = new double[k * k];
        int n = universe.size();
        for (int i = 0; i < n; i++) {
            int p = previous.indexOf(universe.get(i));
            if (p < 0) continue;
            for (int a = 0; a < k; a++) {
                double bn = b[i * k + a];
                for (int c = 0; c < k; c++) m[a * k + c] += bn * previous.exposure(p, c);
            }
        }
        double[] r = rotation(m, k);
        rotateRows(b, n, k, r, par);
        rotateRows(returns, returns.length / k, k, r, par);
        // R' F R = G' G with G = F^(1/2) R (F diagonal and non-negative): symmetric by construction
        double[] g = new double[k * k];
        for (int j = 0; j < k; j++) {
            double sd = Math.sqrt(f[j * k + j]);
            for (int c = 0; c < k; c++) g[j * k + c] = sd * r[j * k + c];
        }
        Dense.crossProduct(g, k, k, f, par);
        return new Rotation(true, "aligned to the previous fit", r);
    }

    /** R = P Q' from the SVD m = P S Q' (k x k, row-major): the orthogonal R maximising trace(R' m). */
    static double[] rotation(double[] m, int k) {
        RealMatrix mm = new Array2DRowRealMatrix(k, k);
        for (int a = 0; a < k; a++) {
            for (int c = 0; c < k; c++) mm.setEntry(a, c, m[a * k + c]);
        }
        SingularValueDecomposition svd = new SingularValueDecomposition(mm);
        RealMatrix r = svd.getU().multiply(svd.getVT());
        double[] out = new double[k * k];
        for (int a = 0; a < k; a++) {
            for (int c = 0; c < k; c++) out[a * k + c] = r.getEntry(a, c);
        }
        return out;
    }

    /** x (rows x k) <- x R. */
    private static void rotateRows(double[] x, int rows, int k, double[] r, Parallel par) {
        double[] out = new double[x.length];
        Dense.leftMultiply(x, rows, r, k, k, out, par);
        System.arraycopy(out, 0, x, 0, x.length);
    }
}
