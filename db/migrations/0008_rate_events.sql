-- Counted events for rate limits that are not sign-ins: password-reset requests per client address
-- and per account, shortlist shares per person. Rows older than a day are pruned as new ones arrive.
CREATE TABLE `rate_events` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`kind` text NOT NULL,
	`key` text NOT NULL,
	`at` integer NOT NULL
);
--> statement-breakpoint
CREATE INDEX `rate_events_kind_key_at_idx` ON `rate_events` (`kind`,`key`,`at`);
