CREATE TABLE `api_tokens` (
	`id` text PRIMARY KEY NOT NULL,
	`user_id` text NOT NULL,
	`name` text NOT NULL,
	`prefix` text NOT NULL,
	`token_hash` text NOT NULL,
	`last_used_at` integer,
	`expires_at` integer,
	`revoked_at` integer,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE UNIQUE INDEX `api_tokens_token_hash_unique` ON `api_tokens` (`token_hash`);--> statement-breakpoint
CREATE INDEX `api_tokens_user_idx` ON `api_tokens` (`user_id`);--> statement-breakpoint
CREATE TABLE `audit_log` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`at` integer NOT NULL,
	`actor_id` text,
	`action` text NOT NULL,
	`entity` text NOT NULL,
	`entity_id` text,
	`before` text,
	`after` text,
	FOREIGN KEY (`actor_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `audit_entity_idx` ON `audit_log` (`entity`,`entity_id`);--> statement-breakpoint
CREATE INDEX `audit_at_idx` ON `audit_log` (`at`);--> statement-breakpoint
CREATE TABLE `calibration_targets` (
	`id` text PRIMARY KEY NOT NULL,
	`name` text NOT NULL,
	`description` text DEFAULT '' NOT NULL,
	`white_point` text DEFAULT 'D65' NOT NULL,
	`patches` text NOT NULL,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL
);
--> statement-breakpoint
CREATE UNIQUE INDEX `calibration_targets_name_unique` ON `calibration_targets` (`name`);--> statement-breakpoint
CREATE TABLE `conditions` (
	`id` text PRIMARY KEY NOT NULL,
	`solvent_id` text NOT NULL,
	`acid_base` text NOT NULL,
	`ph` real,
	`additive` text DEFAULT '' NOT NULL,
	`concentration_umol_l` real,
	`path_length_mm` real,
	`temperature_c` real,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`solvent_id`) REFERENCES `solvents`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `conditions_solvent_idx` ON `conditions` (`solvent_id`);--> statement-breakpoint
CREATE TABLE `dyes` (
	`id` text PRIMARY KEY NOT NULL,
	`code` text NOT NULL,
	`name` text NOT NULL,
	`synonyms` text DEFAULT '[]' NOT NULL,
	`cas_number` text,
	`dye_class` text NOT NULL,
	`molar_mass` real,
	`notes` text DEFAULT '' NOT NULL,
	`hazards` text DEFAULT '' NOT NULL,
	`created_by` text,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	`updated_at` integer,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `dyes_code_unique` ON `dyes` (`code`);--> statement-breakpoint
CREATE TABLE `invitations` (
	`id` text PRIMARY KEY NOT NULL,
	`email` text NOT NULL,
	`name` text NOT NULL,
	`role` text NOT NULL,
	`token_hash` text NOT NULL,
	`invited_by` text NOT NULL,
	`expires_at` integer NOT NULL,
	`used_at` integer,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`invited_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `invitations_token_hash_unique` ON `invitations` (`token_hash`);--> statement-breakpoint
CREATE INDEX `invitations_email_idx` ON `invitations` (`email`);--> statement-breakpoint
CREATE TABLE `lighting_profiles` (
	`id` text PRIMARY KEY NOT NULL,
	`name` text NOT NULL,
	`illuminant` text NOT NULL,
	`light_source` text NOT NULL,
	`camera` text NOT NULL,
	`target_id` text,
	`correction_kind` text NOT NULL,
	`correction` text NOT NULL,
	`residuals` text,
	`valid_from` integer NOT NULL,
	`valid_until` integer,
	`approved_by` text,
	`approved_at` integer,
	`created_by` text,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`target_id`) REFERENCES `calibration_targets`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`approved_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `lighting_profiles_name_unique` ON `lighting_profiles` (`name`);--> statement-breakpoint
CREATE TABLE `measurements` (
	`id` text PRIMARY KEY NOT NULL,
	`photo_id` text,
	`region` text,
	`dye_id` text NOT NULL,
	`condition_id` text NOT NULL,
	`lighting_profile_id` text,
	`raw_r` real NOT NULL,
	`raw_g` real NOT NULL,
	`raw_b` real NOT NULL,
	`x` real NOT NULL,
	`y` real NOT NULL,
	`z` real NOT NULL,
	`l` real NOT NULL,
	`a` real NOT NULL,
	`b` real NOT NULL,
	`illuminant` text DEFAULT 'D65' NOT NULL,
	`observer` text DEFAULT 'CIE 1931 2°' NOT NULL,
	`pixel_count` integer NOT NULL,
	`rejected_count` integer NOT NULL,
	`spread` real NOT NULL,
	`flags` text DEFAULT '[]' NOT NULL,
	`flag_reason` text,
	`review_state` text DEFAULT 'pending' NOT NULL,
	`reviewed_by` text,
	`reviewed_at` integer,
	`review_note` text,
	`created_by` text NOT NULL,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`photo_id`) REFERENCES `photos`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`dye_id`) REFERENCES `dyes`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`condition_id`) REFERENCES `conditions`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`lighting_profile_id`) REFERENCES `lighting_profiles`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`reviewed_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `measurements_dye_idx` ON `measurements` (`dye_id`);--> statement-breakpoint
CREATE INDEX `measurements_condition_idx` ON `measurements` (`condition_id`);--> statement-breakpoint
CREATE INDEX `measurements_photo_idx` ON `measurements` (`photo_id`);--> statement-breakpoint
CREATE INDEX `measurements_review_idx` ON `measurements` (`review_state`);--> statement-breakpoint
CREATE TABLE `password_resets` (
	`id` text PRIMARY KEY NOT NULL,
	`user_id` text NOT NULL,
	`token_hash` text NOT NULL,
	`expires_at` integer NOT NULL,
	`used_at` integer,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE UNIQUE INDEX `password_resets_token_hash_unique` ON `password_resets` (`token_hash`);--> statement-breakpoint
CREATE TABLE `photos` (
	`id` text PRIMARY KEY NOT NULL,
	`storage_key` text NOT NULL,
	`sha256` text NOT NULL,
	`byte_size` integer NOT NULL,
	`mime_type` text NOT NULL,
	`width` integer NOT NULL,
	`height` integer NOT NULL,
	`exif` text DEFAULT '{}' NOT NULL,
	`original_name` text DEFAULT '' NOT NULL,
	`lighting_profile_id` text,
	`uploaded_by` text NOT NULL,
	`taken_at` integer,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`lighting_profile_id`) REFERENCES `lighting_profiles`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`uploaded_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `photos_sha256_unique` ON `photos` (`sha256`);--> statement-breakpoint
CREATE INDEX `photos_profile_idx` ON `photos` (`lighting_profile_id`);--> statement-breakpoint
CREATE TABLE `sessions` (
	`id` text PRIMARY KEY NOT NULL,
	`user_id` text NOT NULL,
	`expires_at` integer NOT NULL,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE INDEX `sessions_user_idx` ON `sessions` (`user_id`);--> statement-breakpoint
CREATE TABLE `shortlist_items` (
	`id` text PRIMARY KEY NOT NULL,
	`shortlist_id` text NOT NULL,
	`dye_id` text NOT NULL,
	`note` text DEFAULT '' NOT NULL,
	`position` integer DEFAULT 0 NOT NULL,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`shortlist_id`) REFERENCES `shortlists`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`dye_id`) REFERENCES `dyes`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `shortlist_items_unique` ON `shortlist_items` (`shortlist_id`,`dye_id`);--> statement-breakpoint
CREATE TABLE `shortlists` (
	`id` text PRIMARY KEY NOT NULL,
	`owner_id` text NOT NULL,
	`name` text NOT NULL,
	`notes` text DEFAULT '' NOT NULL,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	`updated_at` integer,
	FOREIGN KEY (`owner_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE TABLE `sign_in_attempts` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`email` text NOT NULL,
	`ip` text NOT NULL,
	`succeeded` integer NOT NULL,
	`at` integer NOT NULL
);
--> statement-breakpoint
CREATE INDEX `sign_in_attempts_email_idx` ON `sign_in_attempts` (`email`,`at`);--> statement-breakpoint
CREATE INDEX `sign_in_attempts_ip_idx` ON `sign_in_attempts` (`ip`,`at`);--> statement-breakpoint
CREATE TABLE `solvents` (
	`id` text PRIMARY KEY NOT NULL,
	`name` text NOT NULL,
	`synonyms` text DEFAULT '[]' NOT NULL,
	`et30` real,
	`et30_source` text,
	`etn` real,
	`kt_alpha` real,
	`kt_alpha_source` text,
	`kt_beta` real,
	`kt_beta_source` text,
	`kt_pi_star` real,
	`kt_pi_star_source` text,
	`permittivity` real,
	`permittivity_source` text,
	`medium` text NOT NULL,
	`medium_source` text NOT NULL,
	`cautions` text DEFAULT '' NOT NULL,
	`updated_at` integer
);
--> statement-breakpoint
CREATE UNIQUE INDEX `solvents_name_unique` ON `solvents` (`name`);--> statement-breakpoint
CREATE TABLE `spectra` (
	`id` text PRIMARY KEY NOT NULL,
	`dye_id` text NOT NULL,
	`condition_id` text NOT NULL,
	`points` text NOT NULL,
	`lambda_max_nm` real,
	`concentration_umol_l` real,
	`path_length_mm` real,
	`instrument` text DEFAULT '' NOT NULL,
	`created_by` text NOT NULL,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`dye_id`) REFERENCES `dyes`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`condition_id`) REFERENCES `conditions`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `spectra_dye_idx` ON `spectra` (`dye_id`);--> statement-breakpoint
CREATE TABLE `users` (
	`id` text PRIMARY KEY NOT NULL,
	`email` text NOT NULL,
	`name` text NOT NULL,
	`role` text NOT NULL,
	`password_hash` text,
	`deactivated_at` integer,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL
);
--> statement-breakpoint
CREATE UNIQUE INDEX `users_email_unique` ON `users` (`email`);