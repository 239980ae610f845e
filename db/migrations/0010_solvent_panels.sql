-- Saved solvent panels: an ordered list of solvents with their conditions, applied to a rack's vials
-- from left to right in one step. `entries` is a JSON array (see db/schema.ts, PanelEntry).
CREATE TABLE `solvent_panels` (
	`id` text PRIMARY KEY NOT NULL,
	`name` text NOT NULL,
	`entries` text NOT NULL,
	`created_by` text NOT NULL REFERENCES `users`(`id`),
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	`updated_at` integer
);
--> statement-breakpoint
CREATE UNIQUE INDEX `solvent_panels_name_unique` ON `solvent_panels` (`name`);
--> statement-breakpoint
-- Colours measured with an instrument (write API, imports) name it here; null for colours from photos.
ALTER TABLE `measurements` ADD `instrument` text;
