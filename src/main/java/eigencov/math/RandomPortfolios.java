package eigencov.math;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Random;

/**
 * Random long-only test portfolios of a model evaluation (docs/design.md section 6): each of
 * {@code count} portfolios holds {@code names} names drawn without replacement from a pool, with
 * Dirichlet(1) weights (independent standard exponentials, normalised: uniform on the simplex).
 * Drawn once from a seeded {@link Random}, so the same pool and seed give the same portfolios on
 * every run and every JVM.
 */
public final class RandomPortfolios {
    private RandomPortfolios() {
    }

    /** One portfolio: positions in the pool (ascending) and their weights (positive, summing to 1). */
    public record Portfolio(int[] members, double[] weights) {
        public Portfolio {
            members = members.clone();
            weights = weights.clone();
        }

        @Override
        public int[] members() {
            return members.clone();
        }

        @Override
        public double[] weights() {
            return weights.clone();
        }
    }

    /**
     * @param pool  size of the pool to draw from
     * @param count portfolios
     * @param names names per portfolio, at most {@code pool}
     */
    public static List<Portfolio> draw(int pool, int count, int names, long seed) {
        if (count < 1 || names < 1 || names > pool) {
            throw new IllegalArgumentException("need count >= 1 and 1 <= names <= pool, were " + count + ", " + names + ", " + pool);
        }
        Random rnd = new Random(seed);
        int[] order = new int[pool];
        List<Portfolio> out = new ArrayList<>(count);
        for (int p = 0; p < count; p++) {
            for (int i = 0; i < pool; i++) order[i] = i;
            // partial Fisher-Yates: the first `names` entries are a uniform draw without replacement
            for (int i = 0; i < names; i++) {
                int j = i + rnd.nextInt(pool - i);
                int t = order[i];
                order[i] = order[j];
                order[j] = t;
            }
            int[] members = Arrays.copyOf(order, names);
            Arrays.sort(members);
            double[] w = new double[names];
            double total = 0;
            for (int i = 0; i < names; i++) {
                w[i] = -Math.log(1.0 - rnd.nextDouble()); // Exp(1); 1 - U is in (0, 1]
                total += w[i];
            }
            for (int i = 0; i < names; i++) w[i] /= total;
            out.add(new Portfolio(members, w));
        }
        return out;
    }
}
