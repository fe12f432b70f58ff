package eigencov.math;

/** Which matrix the principal components are taken of (docs/design.md section 3). */
public enum Basis {
    /** PCA of the weighted covariance S. */
    COVARIANCE,
    /** PCA of the correlation matrix R = V^-1/2 S V^-1/2, exposures scaled back by sigma_i. */
    CORRELATION
}
