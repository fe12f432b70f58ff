package eigencov.service;

/** Shape of a covariance answer. */
public enum CovarianceForm {
    /** The |S| x |S| matrix {@code B_S F B_S' + D_S}. */
    MATRIX,
    /** The parts {@code B_S}, {@code F}, {@code D_S}, from which a client forms the matrix itself. */
    FACTOR
}
