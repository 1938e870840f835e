CREATE TABLE `bulk_changes` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`actor_id` integer NOT NULL,
	`action` text NOT NULL,
	`summary` text NOT NULL,
	`record_count` integer NOT NULL,
	`records` text NOT NULL,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	`undone_at` text,
	`undone_by` integer,
	FOREIGN KEY (`actor_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`undone_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `bulk_changes_actor_idx` ON `bulk_changes` (`actor_id`,`created_at`);--> statement-breakpoint
CREATE TABLE `closed_days` (
	`day` text PRIMARY KEY NOT NULL,
	`label` text NOT NULL
);
--> statement-breakpoint
CREATE TABLE `import_mappings` (
	`source` text PRIMARY KEY NOT NULL,
	`kind` text NOT NULL,
	`mapping` text NOT NULL,
	`updated_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL
);
--> statement-breakpoint
CREATE TABLE `observed_holidays` (
	`region` text NOT NULL,
	`name` text NOT NULL,
	PRIMARY KEY(`region`, `name`)
);
--> statement-breakpoint
ALTER TABLE `customers` ADD `version` integer DEFAULT 1 NOT NULL;--> statement-breakpoint
ALTER TABLE `detector_models` ADD `sensitivity_low_pct_ft` real;--> statement-breakpoint
ALTER TABLE `detector_models` ADD `sensitivity_high_pct_ft` real;--> statement-breakpoint
ALTER TABLE `events` ADD `source_key` text;--> statement-breakpoint
CREATE UNIQUE INDEX `events_source_key_idx` ON `events` (`source_key`) WHERE source_key is not null;--> statement-breakpoint
ALTER TABLE `sites` ADD `version` integer DEFAULT 1 NOT NULL;--> statement-breakpoint
ALTER TABLE `units` ADD `version` integer DEFAULT 1 NOT NULL;--> statement-breakpoint
ALTER TABLE `users` ADD `regions` text;--> statement-breakpoint
ALTER TABLE `users` ADD `daily_capacity` integer;--> statement-breakpoint
ALTER TABLE `users` ADD `capacity_unit` text DEFAULT 'detectors' NOT NULL;