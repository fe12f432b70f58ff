package eigencov.store;

/** Outcome of an upsert: rows that were new, and rows whose (date, ticker) existed and got the new value. */
public record UpsertCounts(long inserted, long updated) {
}
