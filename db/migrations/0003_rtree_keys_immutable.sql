-- Colour search, second step.
-- 1. The Lab R*Tree gains a fourth dimension, the condition class k = 3·medium + acid/base
--    (medium: protic 0, dipolar-aprotic 1, nonpolar 2; acid 0, neutral 1, base 2), so a search under
--    a medium or acid/base filter reads only the matching entries. Its L*, a*, b* columns and keys
--    are unchanged.
-- 2. Colour search caches, per R*Tree key, the measurement's dye, condition and exact L*, a*, b*.
--    That is only safe if a key never changes meaning: an entry is re-keyed whenever any of those
--    columns, the review state, or the class of its condition changes (keys come from AUTOINCREMENT,
--    so a new entry never reuses an old key).
DROP TRIGGER `measurements_rtree_ins`;
--> statement-breakpoint
DROP TRIGGER `measurements_rtree_upd`;
--> statement-breakpoint
DROP TRIGGER `measurements_rtree_del`;
--> statement-breakpoint
DROP TABLE `measurement_lab_rtree`;
--> statement-breakpoint
CREATE VIRTUAL TABLE `measurement_lab_rtree` USING rtree(`id`, `l_min`, `l_max`, `a_min`, `a_max`, `b_min`, `b_max`, `k_min`, `k_max`);
--> statement-breakpoint
CREATE VIEW `measurement_condition_class` AS
	SELECT c.`id` AS `condition_id`,
		(CASE s.`medium` WHEN 'protic' THEN 0 WHEN 'dipolar-aprotic' THEN 3 ELSE 6 END) + (CASE c.`acid_base` WHEN 'acid' THEN 0 WHEN 'neutral' THEN 1 ELSE 2 END) AS `k`
	FROM `conditions` c JOIN `solvents` s ON s.`id` = c.`solvent_id`;
--> statement-breakpoint
INSERT INTO `measurement_lab_rtree`
	SELECT k.`rowid_key`, m.`l`, m.`l`, m.`a`, m.`a`, m.`b`, m.`b`, cc.`k`, cc.`k`
	FROM `measurement_rtree_ids` k JOIN `measurements` m ON m.`id` = k.`measurement_id` JOIN `measurement_condition_class` cc ON cc.`condition_id` = m.`condition_id`;
--> statement-breakpoint
CREATE TRIGGER `measurements_rtree_ins` AFTER INSERT ON `measurements` WHEN NEW.`review_state` = 'accepted' BEGIN
	INSERT INTO `measurement_rtree_ids` (`measurement_id`) VALUES (NEW.`id`);
	INSERT INTO `measurement_lab_rtree`
		SELECT last_insert_rowid(), NEW.`l`, NEW.`l`, NEW.`a`, NEW.`a`, NEW.`b`, NEW.`b`, cc.`k`, cc.`k`
		FROM `measurement_condition_class` cc WHERE cc.`condition_id` = NEW.`condition_id`;
END;
--> statement-breakpoint
CREATE TRIGGER `measurements_rtree_upd` AFTER UPDATE OF `review_state`, `l`, `a`, `b`, `dye_id`, `condition_id` ON `measurements` BEGIN
	DELETE FROM `measurement_lab_rtree` WHERE `id` = (SELECT `rowid_key` FROM `measurement_rtree_ids` WHERE `measurement_id` = OLD.`id`);
	DELETE FROM `measurement_rtree_ids` WHERE `measurement_id` = OLD.`id`;
	INSERT INTO `measurement_rtree_ids` (`measurement_id`) SELECT NEW.`id` WHERE NEW.`review_state` = 'accepted';
	INSERT INTO `measurement_lab_rtree`
		SELECT last_insert_rowid(), NEW.`l`, NEW.`l`, NEW.`a`, NEW.`a`, NEW.`b`, NEW.`b`, cc.`k`, cc.`k`
		FROM `measurement_condition_class` cc WHERE cc.`condition_id` = NEW.`condition_id` AND NEW.`review_state` = 'accepted';
END;
--> statement-breakpoint
CREATE TRIGGER `measurements_rtree_del` BEFORE DELETE ON `measurements` BEGIN
	DELETE FROM `measurement_lab_rtree` WHERE `id` = (SELECT `rowid_key` FROM `measurement_rtree_ids` WHERE `measurement_id` = OLD.`id`);
	DELETE FROM `measurement_rtree_ids` WHERE `measurement_id` = OLD.`id`;
END;
--> statement-breakpoint
-- A condition or solvent that changes class re-keys its measurements (through the trigger above).
CREATE TRIGGER `conditions_rtree_class_upd` AFTER UPDATE OF `acid_base`, `solvent_id` ON `conditions` BEGIN
	UPDATE `measurements` SET `review_state` = `review_state` WHERE `condition_id` = NEW.`id`;
END;
--> statement-breakpoint
CREATE TRIGGER `solvents_rtree_class_upd` AFTER UPDATE OF `medium` ON `solvents` BEGIN
	UPDATE `measurements` SET `review_state` = `review_state` WHERE `condition_id` IN (SELECT `id` FROM `conditions` WHERE `solvent_id` = NEW.`id`);
END;
--> statement-breakpoint
-- Replicate counts behind a search hit (dye × condition, accepted only) answered from the index alone.
CREATE INDEX `measurements_dye_condition_state_idx` ON `measurements` (`dye_id`, `condition_id`, `review_state`);
