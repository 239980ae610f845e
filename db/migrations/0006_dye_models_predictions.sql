-- Solvent models per dye and their predicted colours, stored apart from measurements (issue 9).
CREATE TABLE `dye_models` (
	`dye_id` text PRIMARY KEY NOT NULL,
	`cache_key` text NOT NULL,
	`version` integer NOT NULL,
	`result` text NOT NULL,
	`computed_at` integer NOT NULL,
	FOREIGN KEY (`dye_id`) REFERENCES `dyes`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE TABLE `dye_predictions` (
	`id` text PRIMARY KEY NOT NULL,
	`dye_id` text NOT NULL,
	`solvent_id` text NOT NULL,
	`l` real NOT NULL,
	`a` real NOT NULL,
	`b` real NOT NULL,
	`illuminant` text DEFAULT 'D65' NOT NULL,
	`observer` text DEFAULT 'CIE 1931 2°' NOT NULL,
	`uncertainty_delta_e00` real NOT NULL,
	`extrapolated` integer NOT NULL,
	`route` text NOT NULL,
	`model` text NOT NULL,
	`wavenumber_cm1` real,
	`wavenumber_half_width_cm1` real,
	`cache_key` text NOT NULL,
	FOREIGN KEY (`dye_id`) REFERENCES `dyes`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`solvent_id`) REFERENCES `solvents`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `dye_predictions_dye_idx` ON `dye_predictions` (`dye_id`);
