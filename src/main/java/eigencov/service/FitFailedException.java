package eigencov.service;

import java.util.List;

/**
 * A fit could not be computed from the data (e.g. too few dates in the window); the attempt was
 * recorded in the fit history as failed and the served fit is untouched (HTTP 422).
 */
public class FitFailedException extends InvalidInputException {
    private final long fitId;

    public FitFailedException(long fitId, String model, String reason) {
        super("fit " + fitId + " of model '" + model + "' failed and was recorded: " + reason,
                List.of(new Issue(null, "asOf", reason)), true, "fit-failed");
        this.fitId = fitId;
    }

    /** Id of the recorded failed attempt. */
    public long fitId() {
        return fitId;
    }
}
