-- The search's replicate means (db/queries/search.ts) are kept in memory per connection and brought up
-- to date from here instead of being rebuilt after every write anywhere. The counter 'search_means' moves
-- only when something a mean depends on changes: an accepted measurement's colour, dye, condition or
-- review state (either side of the change accepted), a condition's solvent, acid/base state or pH, a
-- condition or dye deleted. Each measurement change also leaves one row in search_mean_changes, numbered
-- with the counter's new value, naming the (dye, condition) groups it touched before and after; a reader
-- that finds every number between its own and the counter's replays those groups, and rebuilds when a
-- number is missing (a condition or dye change, or rows already pruned). Rows are pruned 65,536 behind.
INSERT INTO `change_counters` (`name`, `n`) VALUES ('search_means', 0);
--> statement-breakpoint
CREATE TABLE `search_mean_changes` (
	`seq` integer PRIMARY KEY NOT NULL,
	`old_dye_id` text,
	`old_condition_id` text,
	`new_dye_id` text,
	`new_condition_id` text
);
--> statement-breakpoint
CREATE TRIGGER `search_means_meas_ins` AFTER INSERT ON `measurements` WHEN NEW.`review_state` = 'accepted' BEGIN
	UPDATE `change_counters` SET `n` = `n` + 1 WHERE `name` = 'search_means';
	INSERT INTO `search_mean_changes` (`seq`, `new_dye_id`, `new_condition_id`)
		SELECT `n`, NEW.`dye_id`, NEW.`condition_id` FROM `change_counters` WHERE `name` = 'search_means';
END;
--> statement-breakpoint
CREATE TRIGGER `search_means_meas_upd` AFTER UPDATE OF `review_state`, `dye_id`, `condition_id`, `l`, `a`, `b` ON `measurements`
WHEN (OLD.`review_state` = 'accepted' OR NEW.`review_state` = 'accepted')
	AND (OLD.`review_state` IS NOT NEW.`review_state` OR OLD.`dye_id` IS NOT NEW.`dye_id` OR OLD.`condition_id` IS NOT NEW.`condition_id`
		OR OLD.`l` IS NOT NEW.`l` OR OLD.`a` IS NOT NEW.`a` OR OLD.`b` IS NOT NEW.`b`) BEGIN
	UPDATE `change_counters` SET `n` = `n` + 1 WHERE `name` = 'search_means';
	INSERT INTO `search_mean_changes` (`seq`, `old_dye_id`, `old_condition_id`, `new_dye_id`, `new_condition_id`)
		SELECT `n`, OLD.`dye_id`, OLD.`condition_id`, NEW.`dye_id`, NEW.`condition_id` FROM `change_counters` WHERE `name` = 'search_means';
END;
--> statement-breakpoint
CREATE TRIGGER `search_means_meas_del` AFTER DELETE ON `measurements` WHEN OLD.`review_state` = 'accepted' BEGIN
	UPDATE `change_counters` SET `n` = `n` + 1 WHERE `name` = 'search_means';
	INSERT INTO `search_mean_changes` (`seq`, `old_dye_id`, `old_condition_id`)
		SELECT `n`, OLD.`dye_id`, OLD.`condition_id` FROM `change_counters` WHERE `name` = 'search_means';
END;
--> statement-breakpoint
CREATE TRIGGER `search_means_prune` AFTER INSERT ON `search_mean_changes` WHEN NEW.`seq` % 4096 = 0 BEGIN
	DELETE FROM `search_mean_changes` WHERE `seq` <= NEW.`seq` - 65536;
END;
--> statement-breakpoint
CREATE TRIGGER `search_means_cond_upd` AFTER UPDATE OF `solvent_id`, `acid_base`, `ph` ON `conditions`
WHEN OLD.`solvent_id` IS NOT NEW.`solvent_id` OR OLD.`acid_base` IS NOT NEW.`acid_base` OR OLD.`ph` IS NOT NEW.`ph` BEGIN
	UPDATE `change_counters` SET `n` = `n` + 1 WHERE `name` = 'search_means';
END;
--> statement-breakpoint
CREATE TRIGGER `search_means_cond_del` AFTER DELETE ON `conditions` BEGIN
	UPDATE `change_counters` SET `n` = `n` + 1 WHERE `name` = 'search_means';
END;
--> statement-breakpoint
CREATE TRIGGER `search_means_dye_del` AFTER DELETE ON `dyes` BEGIN
	UPDATE `change_counters` SET `n` = `n` + 1 WHERE `name` = 'search_means';
END;
