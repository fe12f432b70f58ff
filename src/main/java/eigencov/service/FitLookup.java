package eigencov.service;

import java.time.LocalDate;

/**
 * Finds the fit a query should use. Implemented by the fit service (in-memory snapshot of each
 * model's newest fit, older fits loaded from the store on demand and cached).
 */
public interface FitLookup {
    /**
     * @param model  model name
     * @param asOf   if not null: the latest fit of the model with asOf &lt;= this date
     * @param fitId  if not null: exactly this fit (must belong to the model); asOf and fitId are not both set
     * @return the fit; default (both null) the newest fit
     * @throws NotFoundException when the model, the fit, or any fit as of that date does not exist
     */
    ServedFit resolve(String model, LocalDate asOf, Long fitId);
}
