package eigencov.math;

/**
 * Beta to the first factor (docs/design.md section 6, "First-factor beta"). {@code p} is the
 * portfolio whose return is the first factor return f_1: weights {@code e_1} in the covariance basis
 * and {@code e_1,i / sigma_i} in the correlation basis, scaled to sum to 1. A name's beta is the
 * slope of its return on that portfolio's under the model, {@code beta = C p / (p'C p)}, so
 * {@code p'beta = 1} and a name moving with the market has a beta near 1 (docs/methods.md section 9).
 *
 * <p>After a rotation (alignment rotate) the first factor is {@code f~_1 = f' R_1}, whose weights are
 * column 1 of {@code B R}: in both bases p follows column 1 of the served exposures, divided by
 * {@code sigma_i^2} in the correlation basis (there {@code B_i = sigma_i e_i}).
 */
public final class FirstFactorBeta {
    private FirstFactorBeta() {
    }

    /**
     * The first-factor portfolio p over the fit's universe (one weight per row of {@link FitResult#model()}),
     * summing to 1. When the raw weights sum to zero (no first fit orients a factor so; a refit follows the
     * previous sign) they are scaled to gross weight 1 instead.
     */
    public static double[] portfolio(FitResult fit) {
        FactorModel m = fit.model();
        int n = m.size();
        double[] p = new double[n];
        double[] s2 = fit.basis() == Basis.CORRELATION ? fit.variances() : null;
        double sum = 0;
        double gross = 0;
        for (int i = 0; i < n; i++) {
            double e = m.exposure(i, 0);
            p[i] = s2 == null ? e : (s2[i] > 0 ? e / s2[i] : 0);
            sum += p[i];
            gross += Math.abs(p[i]);
        }
        double scale = sum != 0 && Double.isFinite(sum) ? sum : gross;
        if (!(scale != 0) || !Double.isFinite(scale)) {
            throw new IllegalArgumentException("the first factor has no weights: its exposures are all zero");
        }
        for (int i = 0; i < n; i++) p[i] /= scale;
        return p;
    }

    /**
     * {@code beta = C p / (p'C p)} for every row of {@code m}, from the factor form in O(K k + k^2):
     * {@code C p = B (F (B'p)) + D p}. {@code p} has one weight per row of m (zero for rows outside the
     * first factor's portfolio, such as short-history names).
     */
    public static double[] betas(FactorModel m, double[] p) {
        int n = m.size();
        if (p.length != n) throw new IllegalArgumentException("p has " + p.length + " weights for " + n + " rows");
        int[] rows = new int[n];
        for (int i = 0; i < n; i++) rows[i] = i;
        // the risk of p: marginal_i = (C p)_i / vol and vol^2 = p'C p, so beta_i = marginal_i / vol
        RiskCalculator.Decomposition risk = RiskCalculator.decompose(m, rows, p, 1.0);
        if (!(risk.vol > 0)) throw new IllegalArgumentException("the first factor's portfolio has no variance under the model");
        double[] beta = new double[n];
        for (int i = 0; i < n; i++) beta[i] = risk.marginal[i] / risk.vol;
        return beta;
    }

    /** The betas of every row of the fit's served model ({@link FitResult#servedModel()}, passed in as {@code served}). */
    public static double[] betas(FitResult fit, FactorModel served) {
        double[] p = java.util.Arrays.copyOf(portfolio(fit), served.size());
        return betas(served, p);
    }
}
