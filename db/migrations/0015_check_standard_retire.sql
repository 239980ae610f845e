-- Check standards can be edited and retired (issue 8): who retired one and when, and when it was last edited.
ALTER TABLE `check_standards` ADD `updated_at` integer;
--> statement-breakpoint
ALTER TABLE `check_standards` ADD `retired_at` integer;
--> statement-breakpoint
ALTER TABLE `check_standards` ADD `retired_by` text REFERENCES users(id);
