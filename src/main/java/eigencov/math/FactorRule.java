package eigencov.math;

/**
 * How many factors a fit keeps (docs/design.md section 4, PUT /v1/models {@code factors}). Every rule's
 * choice is clipped to [1, rank] by {@link FactorCount}.
 */
public sealed interface FactorRule {

    /** Short name as used in the API ({@code fixed}, {@code variance-share}, ...). */
    String name();

    /** Exactly {@code count} factors (clipped to the rank of the window). */
    record Fixed(int count) implements FactorRule {
        public Fixed {
            if (count < 1) {
                throw new IllegalArgumentException("factors.count must be at least 1, was " + count);
            }
        }

        @Override
        public String name() {
            return "fixed";
        }
    }

    /** Smallest k whose eigenvalues explain at least {@code share} of the total variance. */
    record VarianceShare(double share) implements FactorRule {
        public VarianceShare {
            if (!(share > 0 && share <= 1)) {
                throw new IllegalArgumentException("factors.share must be in (0, 1], was " + share);
            }
        }

        @Override
        public String name() {
            return "variance-share";
        }
    }

    /** Bai and Ng (2002) IC_p2 minimised over k = 0..max. */
    record BaiNg(int max) implements FactorRule {
        public BaiNg {
            if (max < 1) {
                throw new IllegalArgumentException("factors.max must be at least 1, was " + max);
            }
        }

        @Override
        public String name() {
            return "bai-ng";
        }
    }

    /** Ahn and Horenstein (2013) eigenvalue ratio ER(k) = lambda_k / lambda_k+1 maximised over 1..max. */
    record EigenvalueRatio(int max) implements FactorRule {
        public EigenvalueRatio {
            if (max < 1) {
                throw new IllegalArgumentException("factors.max must be at least 1, was " + max);
            }
        }

        @Override
        public String name() {
            return "eigenvalue-ratio";
        }
    }

    /** Eigenvalues above the Marchenko-Pastur upper edge of the residual spectrum. */
    record RandomMatrix() implements FactorRule {
        @Override
        public String name() {
            return "random-matrix";
        }
    }
}
