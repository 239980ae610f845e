-- The search's in-memory means now also carry each group's mean of uᵢ² (the ± ΔE00 behind the tie
-- rule, db/queries/search.ts), so a change of an accepted measurement's `u_delta_e00` moves the
-- 'search_means' counter and leaves a search_mean_changes row like a change of its colour does.
DROP TRIGGER `search_means_meas_upd`;
--> statement-breakpoint
CREATE TRIGGER `search_means_meas_upd` AFTER UPDATE OF `review_state`, `dye_id`, `condition_id`, `l`, `a`, `b`, `u_delta_e00` ON `measurements`
WHEN (OLD.`review_state` = 'accepted' OR NEW.`review_state` = 'accepted')
	AND (OLD.`review_state` IS NOT NEW.`review_state` OR OLD.`dye_id` IS NOT NEW.`dye_id` OR OLD.`condition_id` IS NOT NEW.`condition_id`
		OR OLD.`l` IS NOT NEW.`l` OR OLD.`a` IS NOT NEW.`a` OR OLD.`b` IS NOT NEW.`b` OR OLD.`u_delta_e00` IS NOT NEW.`u_delta_e00`) BEGIN
	UPDATE `change_counters` SET `n` = `n` + 1 WHERE `name` = 'search_means';
	INSERT INTO `search_mean_changes` (`seq`, `old_dye_id`, `old_condition_id`, `new_dye_id`, `new_condition_id`)
		SELECT `n`, OLD.`dye_id`, OLD.`condition_id`, NEW.`dye_id`, NEW.`condition_id` FROM `change_counters` WHERE `name` = 'search_means';
END;
