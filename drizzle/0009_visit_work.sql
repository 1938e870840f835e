ALTER TABLE `attachments` ADD `thumb_key` text;--> statement-breakpoint
ALTER TABLE `notifications` ADD `cleared_with` text;--> statement-breakpoint
ALTER TABLE `notifications` ADD `cleared_by` integer REFERENCES users(id);--> statement-breakpoint
ALTER TABLE `visit_detectors` ADD `result_reason` text;--> statement-breakpoint
ALTER TABLE `visit_detectors` ADD `findings` text;--> statement-breakpoint
ALTER TABLE `visits` ADD `window_from` text;--> statement-breakpoint
ALTER TABLE `visits` ADD `window_until` text;--> statement-breakpoint
ALTER TABLE `visits` ADD `started_at` text;--> statement-breakpoint
ALTER TABLE `visits` ADD `completed_at` text;--> statement-breakpoint
ALTER TABLE `visits` ADD `cancelled_at` text;--> statement-breakpoint
ALTER TABLE `visits` ADD `cancel_reason` text;