-- A counter per cached read model, bumped by triggers in the writing transaction, so a process can keep
-- a derived list in memory (the dye list with its measurement counts, its text-search index) and know,
-- with one indexed read, whether it is still current. Covers writes by any process (CLI, seed, server).
CREATE TABLE `change_counters` (
	`name` text PRIMARY KEY NOT NULL,
	`n` integer NOT NULL DEFAULT 0
);
--> statement-breakpoint
INSERT INTO `change_counters` (`name`, `n`) VALUES ('dyes', 0);
--> statement-breakpoint
CREATE TRIGGER `dyes_version_ins` AFTER INSERT ON `dyes` BEGIN
	UPDATE `change_counters` SET `n` = `n` + 1 WHERE `name` = 'dyes';
END;
--> statement-breakpoint
CREATE TRIGGER `dyes_version_upd` AFTER UPDATE ON `dyes` BEGIN
	UPDATE `change_counters` SET `n` = `n` + 1 WHERE `name` = 'dyes';
END;
--> statement-breakpoint
CREATE TRIGGER `dyes_version_del` AFTER DELETE ON `dyes` BEGIN
	UPDATE `change_counters` SET `n` = `n` + 1 WHERE `name` = 'dyes';
END;
--> statement-breakpoint
CREATE TRIGGER `dyes_version_meas_ins` AFTER INSERT ON `measurements` BEGIN
	UPDATE `change_counters` SET `n` = `n` + 1 WHERE `name` = 'dyes';
END;
--> statement-breakpoint
CREATE TRIGGER `dyes_version_meas_upd` AFTER UPDATE OF `review_state`, `dye_id` ON `measurements` BEGIN
	UPDATE `change_counters` SET `n` = `n` + 1 WHERE `name` = 'dyes';
END;
--> statement-breakpoint
CREATE TRIGGER `dyes_version_meas_del` AFTER DELETE ON `measurements` BEGIN
	UPDATE `change_counters` SET `n` = `n` + 1 WHERE `name` = 'dyes';
END;
