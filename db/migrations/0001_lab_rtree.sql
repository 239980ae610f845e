-- R*Tree over the CIELAB (D65) colour of accepted measurements: the prefilter of colour search.
-- R*Tree stores 32-bit floats and rounds boxes outward, so it can only over-include; the exact
-- CIEDE2000 re-rank works on the real-valued columns of measurements.
CREATE VIRTUAL TABLE `measurement_lab_rtree` USING rtree(`id`, `l_min`, `l_max`, `a_min`, `a_max`, `b_min`, `b_max`);
--> statement-breakpoint
CREATE TABLE `measurement_rtree_ids` (
	`rowid_key` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`measurement_id` text NOT NULL UNIQUE REFERENCES `measurements`(`id`) ON DELETE CASCADE
);
--> statement-breakpoint
CREATE TRIGGER `measurements_rtree_ins` AFTER INSERT ON `measurements` WHEN NEW.`review_state` = 'accepted' BEGIN
	INSERT INTO `measurement_rtree_ids` (`measurement_id`) VALUES (NEW.`id`);
	INSERT INTO `measurement_lab_rtree` VALUES (last_insert_rowid(), NEW.`l`, NEW.`l`, NEW.`a`, NEW.`a`, NEW.`b`, NEW.`b`);
END;
--> statement-breakpoint
CREATE TRIGGER `measurements_rtree_upd` AFTER UPDATE OF `review_state`, `l`, `a`, `b` ON `measurements` BEGIN
	DELETE FROM `measurement_lab_rtree` WHERE `id` = (SELECT `rowid_key` FROM `measurement_rtree_ids` WHERE `measurement_id` = OLD.`id`);
	DELETE FROM `measurement_rtree_ids` WHERE `measurement_id` = OLD.`id`;
	INSERT INTO `measurement_rtree_ids` (`measurement_id`) SELECT NEW.`id` WHERE NEW.`review_state` = 'accepted';
	INSERT INTO `measurement_lab_rtree` SELECT last_insert_rowid(), NEW.`l`, NEW.`l`, NEW.`a`, NEW.`a`, NEW.`b`, NEW.`b` WHERE NEW.`review_state` = 'accepted';
END;
--> statement-breakpoint
CREATE TRIGGER `measurements_rtree_del` BEFORE DELETE ON `measurements` BEGIN
	DELETE FROM `measurement_lab_rtree` WHERE `id` = (SELECT `rowid_key` FROM `measurement_rtree_ids` WHERE `measurement_id` = OLD.`id`);
	DELETE FROM `measurement_rtree_ids` WHERE `measurement_id` = OLD.`id`;
END;

