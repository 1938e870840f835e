CREATE TABLE `saved_views` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`user_id` integer NOT NULL,
	`page` text NOT NULL,
	`name` text NOT NULL,
	`query` text NOT NULL,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `saved_views_user_page_name_idx` ON `saved_views` (`user_id`,`page`,`name`);--> statement-breakpoint
ALTER TABLE `detectors` ADD `loop_verdict` text;--> statement-breakpoint
ALTER TABLE `detectors` ADD `assigned_to` integer REFERENCES users(id);--> statement-breakpoint
ALTER TABLE `detectors` ADD `acknowledged_at` text;--> statement-breakpoint
ALTER TABLE `detectors` ADD `acknowledged_by` integer REFERENCES users(id);--> statement-breakpoint
CREATE INDEX `detectors_assigned_idx` ON `detectors` (`assigned_to`);