-- Per ok fit: the universe's variances S_ii (the correlation basis's sigma_i^2, for the first factor's
-- portfolio) and the short-history names served beside the universe (docs/design.md section 6): tickers
-- joined by newlines, observation counts int32, exposures (n x k) and specific variances float64, all
-- little-endian. NULL in fits stored before these were kept (no short-history names; variances then
-- taken from the model's diagonal).
ALTER TABLE fit_data ADD COLUMN variances BYTEA;
ALTER TABLE fit_data ADD COLUMN short_history_tickers TEXT;
ALTER TABLE fit_data ADD COLUMN short_history_observations BYTEA;
ALTER TABLE fit_data ADD COLUMN short_history_exposures BYTEA;
ALTER TABLE fit_data ADD COLUMN short_history_specific BYTEA;
