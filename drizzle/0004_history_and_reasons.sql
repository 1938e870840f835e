CREATE TABLE `task_results` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`detector_id` integer NOT NULL,
	`visit_id` integer NOT NULL,
	`task` text NOT NULL,
	`done_on` text NOT NULL,
	`outcome` text NOT NULL,
	`value` real,
	`notes` text,
	`recorded_by` integer,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	FOREIGN KEY (`detector_id`) REFERENCES `detectors`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`visit_id`) REFERENCES `visits`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`recorded_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `task_results_detector_idx` ON `task_results` (`detector_id`,`task`,`done_on`);--> statement-breakpoint
CREATE INDEX `task_results_visit_idx` ON `task_results` (`visit_id`);--> statement-breakpoint
ALTER TABLE `detectors` ADD `next_visual_on` text;--> statement-breakpoint
ALTER TABLE `detectors` ADD `next_functional_on` text;--> statement-breakpoint
ALTER TABLE `detectors` ADD `next_sensitivity_on` text;--> statement-breakpoint
ALTER TABLE `detectors` ADD `next_cleaning_on` text;--> statement-breakpoint
ALTER TABLE `detectors` ADD `risk_reasons` text DEFAULT '' NOT NULL;--> statement-breakpoint
ALTER TABLE `detectors` ADD `loop_findings` text DEFAULT '' NOT NULL;