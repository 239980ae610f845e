-- Lighting calibration as an admin workflow: profile states (draft → approved → retired), the fitted
-- calibration with leave-one-out residuals, card layouts, check standards and their readings, drift.
ALTER TABLE `lighting_profiles` ADD `state` text DEFAULT 'draft' NOT NULL;
--> statement-breakpoint
ALTER TABLE `lighting_profiles` ADD `colour_temperature_k` real;
--> statement-breakpoint
ALTER TABLE `lighting_profiles` ADD `camera_settings` text DEFAULT '' NOT NULL;
--> statement-breakpoint
ALTER TABLE `lighting_profiles` ADD `method` text;
--> statement-breakpoint
ALTER TABLE `lighting_profiles` ADD `notes` text DEFAULT '' NOT NULL;
--> statement-breakpoint
ALTER TABLE `lighting_profiles` ADD `calibration` text;
--> statement-breakpoint
ALTER TABLE `lighting_profiles` ADD `loo_mean_delta_e00` real;
--> statement-breakpoint
ALTER TABLE `lighting_profiles` ADD `loo_max_delta_e00` real;
--> statement-breakpoint
ALTER TABLE `lighting_profiles` ADD `fit_photo_id` text REFERENCES `photos`(`id`);
--> statement-breakpoint
ALTER TABLE `lighting_profiles` ADD `fit_grid` text;
--> statement-breakpoint
ALTER TABLE `lighting_profiles` ADD `fit_samples` text;
--> statement-breakpoint
ALTER TABLE `lighting_profiles` ADD `retired_by` text REFERENCES `users`(`id`);
--> statement-breakpoint
ALTER TABLE `lighting_profiles` ADD `retired_at` integer;
--> statement-breakpoint
ALTER TABLE `lighting_profiles` ADD `updated_at` integer;
--> statement-breakpoint
-- Profiles approved before states existed stay approved; the method is the correction they hold.
UPDATE `lighting_profiles` SET `state` = 'approved' WHERE `approved_at` IS NOT NULL;
--> statement-breakpoint
UPDATE `lighting_profiles` SET `method` = `correction_kind` WHERE `method` IS NULL;
--> statement-breakpoint
ALTER TABLE `calibration_targets` ADD `grid_rows` integer;
--> statement-breakpoint
ALTER TABLE `calibration_targets` ADD `grid_columns` integer;
--> statement-breakpoint
ALTER TABLE `calibration_targets` ADD `source` text DEFAULT '' NOT NULL;
--> statement-breakpoint
ALTER TABLE `calibration_targets` ADD `updated_at` integer;
--> statement-breakpoint
CREATE TABLE `check_standards` (
	`id` text PRIMARY KEY NOT NULL,
	`name` text NOT NULL,
	`kind` text DEFAULT 'vial' NOT NULL,
	`l` real NOT NULL,
	`a` real NOT NULL,
	`b` real NOT NULL,
	`white_point` text DEFAULT 'D65' NOT NULL,
	`source_instrument` text NOT NULL,
	`notes` text DEFAULT '' NOT NULL,
	`created_by` text,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `check_standards_name_unique` ON `check_standards` (`name`);
--> statement-breakpoint
CREATE TABLE `check_readings` (
	`id` text PRIMARY KEY NOT NULL,
	`standard_id` text NOT NULL,
	`profile_id` text,
	`photo_id` text,
	`l` real NOT NULL,
	`a` real NOT NULL,
	`b` real NOT NULL,
	`delta_e00` real NOT NULL,
	`created_by` text,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`standard_id`) REFERENCES `check_standards`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`profile_id`) REFERENCES `lighting_profiles`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`photo_id`) REFERENCES `photos`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `check_readings_profile_idx` ON `check_readings` (`profile_id`,`created_at`);
--> statement-breakpoint
CREATE TABLE `drift_readings` (
	`id` text PRIMARY KEY NOT NULL,
	`profile_id` text NOT NULL,
	`photo_id` text,
	`label` text DEFAULT '' NOT NULL,
	`delta_e00` real NOT NULL,
	`threshold_delta_e00` real NOT NULL,
	`flagged` integer DEFAULT false NOT NULL,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`profile_id`) REFERENCES `lighting_profiles`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`photo_id`) REFERENCES `photos`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `drift_readings_profile_idx` ON `drift_readings` (`profile_id`,`created_at`);
