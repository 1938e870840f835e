CREATE TABLE `digest_snapshots` (
	`user_id` integer NOT NULL,
	`week` text NOT NULL,
	`figures` text NOT NULL,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	PRIMARY KEY(`user_id`, `week`),
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
ALTER TABLE `detectors` ADD `eol_tolerance_pct` real;--> statement-breakpoint
ALTER TABLE `detectors` ADD `alarm_threshold_ohms` integer;--> statement-breakpoint
ALTER TABLE `sessions` ADD `id_token` text;--> statement-breakpoint
ALTER TABLE `sites` ADD `keeps_nuisance_records` integer DEFAULT false NOT NULL;--> statement-breakpoint
ALTER TABLE `units` ADD `storey_return_detectors` integer;