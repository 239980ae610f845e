-- Colour search caches, per R*Tree key, the measurement's dye, condition and exact L*, a*, b*.
-- That is only safe if a key never changes meaning: re-key a measurement's R*Tree entry whenever
-- any of those columns changes (keys come from AUTOINCREMENT, so a new entry never reuses an old key).
DROP TRIGGER `measurements_rtree_upd`;
--> statement-breakpoint
CREATE TRIGGER `measurements_rtree_upd` AFTER UPDATE OF `review_state`, `l`, `a`, `b`, `dye_id`, `condition_id` ON `measurements` BEGIN
	DELETE FROM `measurement_lab_rtree` WHERE `id` = (SELECT `rowid_key` FROM `measurement_rtree_ids` WHERE `measurement_id` = OLD.`id`);
	DELETE FROM `measurement_rtree_ids` WHERE `measurement_id` = OLD.`id`;
	INSERT INTO `measurement_rtree_ids` (`measurement_id`) SELECT NEW.`id` WHERE NEW.`review_state` = 'accepted';
	INSERT INTO `measurement_lab_rtree` SELECT last_insert_rowid(), NEW.`l`, NEW.`l`, NEW.`a`, NEW.`a`, NEW.`b`, NEW.`b` WHERE NEW.`review_state` = 'accepted';
END;
--> statement-breakpoint
-- Replicate counts behind a search hit (dye × condition, accepted only) answered from the index alone.
CREATE INDEX `measurements_dye_condition_state_idx` ON `measurements` (`dye_id`, `condition_id`, `review_state`);
