package eigencov.math;

import java.util.List;
import java.util.Objects;

/**
 * How factor signs were fixed (docs/design.md section 3, docs/methods.md section 8).
 *
 * @param mode           {@link #FIRST_FIT} (signs by positive column sum) or {@link #PREVIOUS_FIT}
 * @param commonTickers  tickers shared with the previous model (0 on a first fit)
 * @param flipped        factors whose sign was flipped relative to the solver's output
 * @param cosines        per new factor, |cos| with the previous factor it matched (over common tickers);
 *                       empty on a first fit
 * @param matched        per new factor, the previous factor it matched (-1 when none is left)
 * @param swaps          new factors that matched a previous factor of another position
 * @param weak           new factors whose best |cos| is below {@link #WEAK_COSINE}
 * @param overlap        subspace overlap ||C||_F^2 / min(k_new, k_old), C = cosine matrix; 1 = same span
 * @param rotation       the optional Procrustes step ({@link FitOptions#rotate()}), or null when not asked for
 */
public record AlignmentReport(String mode, int commonTickers, List<Integer> flipped, double[] cosines,
                              int[] matched, List<Integer> swaps, List<Integer> weak, double overlap, Rotation rotation) {
    public static final String FIRST_FIT = "first fit";
    public static final String PREVIOUS_FIT = "previous fit";
    /** Alignment weaker than this |cos| is reported (issue 3). */
    public static final double WEAK_COSINE = 0.5;

    public AlignmentReport {
        Objects.requireNonNull(mode, "mode");
        flipped = List.copyOf(flipped);
        swaps = List.copyOf(swaps);
        weak = List.copyOf(weak);
        cosines = cosines.clone();
        matched = matched.clone();
    }

    /** Signs only (no rotation asked for). */
    public AlignmentReport(String mode, int commonTickers, List<Integer> flipped, double[] cosines,
                           int[] matched, List<Integer> swaps, List<Integer> weak, double overlap) {
        this(mode, commonTickers, flipped, cosines, matched, swaps, weak, overlap, null);
    }

    /** This report with the rotation step's outcome. */
    public AlignmentReport withRotation(Rotation r) {
        return new AlignmentReport(mode, commonTickers, flipped, cosines, matched, swaps, weak, overlap, r);
    }

    @Override
    public double[] cosines() {
        return cosines.clone();
    }

    @Override
    public int[] matched() {
        return matched.clone();
    }
}
