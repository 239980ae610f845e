-- Explicit pH series: a chemist groups measured vials of one dye in one medium into a named series,
-- with the pH of each vial and the medium's ionic strength. Fits of the series are stored apart, with a
-- cache key that fingerprints the vials, and are recomputed when it no longer matches.
CREATE TABLE `ph_series` (
	`id` text PRIMARY KEY NOT NULL,
	`dye_id` text NOT NULL REFERENCES `dyes`(`id`),
	`name` text NOT NULL,
	`solvent_id` text NOT NULL REFERENCES `solvents`(`id`),
	`second_solvent_id` text REFERENCES `solvents`(`id`),
	`second_solvent_mole_fraction` real,
	`ionic_strength_mol_l` real,
	`notes` text DEFAULT '' NOT NULL,
	`created_by` text NOT NULL REFERENCES `users`(`id`),
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	`updated_at` integer
);
--> statement-breakpoint
CREATE INDEX `ph_series_dye_idx` ON `ph_series` (`dye_id`);
--> statement-breakpoint
CREATE UNIQUE INDEX `ph_series_dye_name_unique` ON `ph_series` (`dye_id`,`name`);
--> statement-breakpoint
CREATE TABLE `ph_series_vials` (
	`series_id` text NOT NULL REFERENCES `ph_series`(`id`) ON DELETE CASCADE,
	`measurement_id` text NOT NULL REFERENCES `measurements`(`id`) ON DELETE CASCADE,
	`ph` real NOT NULL,
	PRIMARY KEY(`series_id`, `measurement_id`)
);
--> statement-breakpoint
CREATE INDEX `ph_series_vials_measurement_idx` ON `ph_series_vials` (`measurement_id`);
--> statement-breakpoint
CREATE TABLE `ph_series_fits` (
	`series_id` text PRIMARY KEY NOT NULL REFERENCES `ph_series`(`id`) ON DELETE CASCADE,
	`cache_key` text NOT NULL,
	`version` integer NOT NULL,
	`result` text NOT NULL,
	`computed_at` integer NOT NULL
);
-- Journal note: this migration's "when" (1796190850000) lies after 0012's, because 0012 reached main first;
-- drizzle applies a migration only when its "when" is later than the newest one a database has, so a
-- database already at 0012 still receives this one. A fresh database applies them in journal order.
