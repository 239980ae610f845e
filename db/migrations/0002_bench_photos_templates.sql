CREATE TABLE `rack_templates` (
	`id` text PRIMARY KEY NOT NULL,
	`name` text NOT NULL,
	`regions` text NOT NULL,
	`created_by` text NOT NULL,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	`updated_at` integer,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `rack_templates_name_unique` ON `rack_templates` (`name`);--> statement-breakpoint
ALTER TABLE `measurements` ADD `correction_kind` text;--> statement-breakpoint
ALTER TABLE `measurements` ADD `correction` text;--> statement-breakpoint
ALTER TABLE `measurements` ADD `reference_patches` text;--> statement-breakpoint
ALTER TABLE `photos` ADD `thumb_key` text;--> statement-breakpoint
ALTER TABLE `photos` ADD `display_key` text;--> statement-breakpoint
ALTER TABLE `photos` ADD `bit_depth` integer DEFAULT 8 NOT NULL;--> statement-breakpoint
ALTER TABLE `photos` ADD `colour_space` text DEFAULT 'srgb' NOT NULL;