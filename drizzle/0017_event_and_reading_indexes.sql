DROP INDEX `events_time_idx`;--> statement-breakpoint
CREATE INDEX `events_time_idx` ON `events` (`occurred_at`,`id`,`detector_id`,`site_id`);--> statement-breakpoint
CREATE INDEX `readings_visit_idx` ON `readings` (`visit_id`,`detector_id`);--> statement-breakpoint
ANALYZE `events`;--> statement-breakpoint
ANALYZE `readings`;
