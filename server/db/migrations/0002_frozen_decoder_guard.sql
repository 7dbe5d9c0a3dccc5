-- A frozen decoder's artifact is sealed by its SHA-256: the database refuses any change to what
-- the seal covers (and to the freeze itself), and refuses deleting a frozen decoder.
CREATE TRIGGER `decoders_frozen_immutable` BEFORE UPDATE ON `decoders`
WHEN OLD.`status` = 'frozen' AND (
  NEW.`artifact` IS NOT OLD.`artifact` OR NEW.`sha256` IS NOT OLD.`sha256` OR NEW.`status` IS NOT OLD.`status`
  OR NEW.`frozen_at` IS NOT OLD.`frozen_at` OR NEW.`study_id` IS NOT OLD.`study_id` OR NEW.`recipe` IS NOT OLD.`recipe`
  OR NEW.`classes` IS NOT OLD.`classes` OR NEW.`channel_names` IS NOT OLD.`channel_names`
  OR NEW.`sample_rate_hz` IS NOT OLD.`sample_rate_hz` OR NEW.`epoch_start_s` IS NOT OLD.`epoch_start_s`
  OR NEW.`epoch_end_s` IS NOT OLD.`epoch_end_s`)
BEGIN
  SELECT RAISE(ABORT, 'decoder-frozen: a frozen decoder never changes');
END;
--> statement-breakpoint
CREATE TRIGGER `decoders_frozen_undeletable` BEFORE DELETE ON `decoders`
WHEN OLD.`status` = 'frozen'
BEGIN
  SELECT RAISE(ABORT, 'decoder-frozen: a frozen decoder is never deleted');
END;
