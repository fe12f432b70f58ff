package eigencov.math;

import java.util.LinkedHashMap;
import java.util.Map;

/**
 * Hysteresis on the number of factors across refits (docs/methods.md section 2, practice): keep the
 * previous fit's k until the rule has disagreed with it in {@code fits} consecutive fits, so that
 * a criterion hovering between two values does not add and drop a factor at every refit.
 *
 * <p>State travels with the fits: each fit's {@link FactorCountReport} records the rule's own k
 * ({@value #RULE_K}), the hold ({@value #FITS}) and how many consecutive fits have disagreed
 * so far ({@value #DISAGREEMENTS}); the next fit reads them from its predecessor.
 *
 * @param fits                  consecutive disagreeing fits needed to change k; 1 = no hold (k follows the rule)
 * @param previousK             k of the previous fit of the same rule, or null (first fit, or the rule changed)
 * @param previousDisagreements disagreements counted up to and including the previous fit
 */
public record FactorHold(int fits, Integer previousK, int previousDisagreements) {
    public static final FactorHold NONE = new FactorHold(1, null, 0);
    /** Report parameter: the k the rule itself chose (after clipping to [1, rank]). */
    public static final String RULE_K = "hold.ruleK";
    /** Report parameter: the hold in fits. */
    public static final String FITS = "hold.fits";
    /** Report parameter: consecutive fits, this one included, whose rule disagreed with the k kept. */
    public static final String DISAGREEMENTS = "hold.disagreements";

    public FactorHold {
        if (fits < 1) throw new IllegalArgumentException("factors.hold must be at least 1, was " + fits);
        if (previousK != null && previousK < 1) throw new IllegalArgumentException("previous k must be at least 1, was " + previousK);
        if (previousDisagreements < 0) throw new IllegalArgumentException("disagreements must not be negative, was " + previousDisagreements);
    }

    /**
     * The hold of a fit whose predecessor (same model, earlier as-of date) reported {@code previous}:
     * its state counts only when the predecessor used the same rule and a hold.
     */
    public static FactorHold after(int fits, FactorCountReport previous, FactorRule rule) {
        if (fits <= 1 || previous == null || !previous.rule().equals(rule.name())) return new FactorHold(fits, null, 0);
        Double d = previous.parameters().get(DISAGREEMENTS);
        return new FactorHold(fits, previous.k(), d == null ? 0 : (int) Math.round(d));
    }

    /**
     * Applies the hold to the rule's report: the k kept (the previous k, clipped to [1, rank] and to
     * the rule's maximum, while the rule has disagreed in fewer than {@code fits} consecutive fits;
     * else the rule's k) and the hold's state among the parameters. Without a hold, {@code count}
     * unchanged.
     */
    public FactorCountReport apply(FactorCountReport count, FactorRule rule, int rank) {
        if (fits <= 1) return count;
        int ruleK = count.k();
        int k = ruleK;
        int disagreements = 0;
        if (previousK != null) {
            int held = Math.max(1, Math.min(previousK, cap(rule, rank)));
            if (held != ruleK) {
                disagreements = previousDisagreements + 1;
                if (disagreements < fits) {
                    k = held;
                } else {
                    disagreements = 0;
                }
            }
        }
        Map<String, Double> p = new LinkedHashMap<>(count.parameters());
        p.put(RULE_K, (double) ruleK);
        p.put(FITS, (double) fits);
        p.put(DISAGREEMENTS, (double) disagreements);
        return new FactorCountReport(count.rule(), k, count.unclipped(), count.criterion(), count.firstK(), count.values(), p);
    }

    /** Most factors the rule may give: the rank, or less when the rule has a maximum. */
    private static int cap(FactorRule rule, int rank) {
        if (rule instanceof FactorRule.BaiNg b) return Math.min(rank, b.max());
        if (rule instanceof FactorRule.EigenvalueRatio e) return Math.min(rank, e.max());
        if (rule instanceof FactorRule.Fixed f) return Math.min(rank, f.count());
        return rank;
    }
}
