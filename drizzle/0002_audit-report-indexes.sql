CREATE INDEX `events_kind_occurred_idx` ON `events` (`kind`,`occurred_at`,`id`,`fixture_id`);--> statement-breakpoint
CREATE INDEX `flags_raised_idx` ON `flags` (`raised_at`);--> statement-breakpoint
CREATE INDEX `flags_cleared_idx` ON `flags` (`cleared_at`);