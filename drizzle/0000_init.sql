CREATE TABLE `api_tokens` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`user_id` integer NOT NULL,
	`name` text NOT NULL,
	`token_hash` text NOT NULL,
	`prefix` text NOT NULL,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	`expires_at` text NOT NULL,
	`last_used_at` text,
	`revoked_at` text,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `api_tokens_hash_idx` ON `api_tokens` (`token_hash`);--> statement-breakpoint
CREATE INDEX `api_tokens_user_idx` ON `api_tokens` (`user_id`);--> statement-breakpoint
CREATE TABLE `attachments` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`detector_id` integer,
	`visit_id` integer,
	`file_name` text NOT NULL,
	`content_type` text NOT NULL,
	`size_bytes` integer NOT NULL,
	`storage_key` text NOT NULL,
	`uploaded_by` integer,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	FOREIGN KEY (`detector_id`) REFERENCES `detectors`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`visit_id`) REFERENCES `visits`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`uploaded_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `attachments_storage_key_unique` ON `attachments` (`storage_key`);--> statement-breakpoint
CREATE INDEX `attachments_detector_idx` ON `attachments` (`detector_id`);--> statement-breakpoint
CREATE INDEX `attachments_visit_idx` ON `attachments` (`visit_id`);--> statement-breakpoint
CREATE TABLE `audit_log` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	`actor_id` integer,
	`action` text NOT NULL,
	`entity` text NOT NULL,
	`entity_id` text,
	`before` text,
	`after` text,
	FOREIGN KEY (`actor_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `audit_entity_idx` ON `audit_log` (`entity`,`entity_id`);--> statement-breakpoint
CREATE INDEX `audit_at_idx` ON `audit_log` (`created_at`);--> statement-breakpoint
CREATE TABLE `customers` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`name` text NOT NULL,
	`kind` text NOT NULL,
	`contact_name` text,
	`contact_email` text,
	`contact_phone` text,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL
);
--> statement-breakpoint
CREATE INDEX `customers_name_idx` ON `customers` (`name`);--> statement-breakpoint
CREATE TABLE `detector_models` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`name` text NOT NULL,
	`supervisory_labelled_in` text DEFAULT 'de-energized' NOT NULL,
	`aux_contacts` integer DEFAULT 2 NOT NULL,
	`standby_va` real NOT NULL,
	`alarm_va` real NOT NULL,
	`velocity_min_fpm` integer NOT NULL,
	`velocity_max_fpm` integer NOT NULL,
	`pressure_min_in_wc` real NOT NULL,
	`pressure_max_in_wc` real NOT NULL
);
--> statement-breakpoint
CREATE UNIQUE INDEX `detector_models_name_unique` ON `detector_models` (`name`);--> statement-breakpoint
CREATE TABLE `detectors` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`unit_id` integer NOT NULL,
	`site_id` integer NOT NULL,
	`customer_id` integer NOT NULL,
	`model_id` integer NOT NULL,
	`tag` text NOT NULL,
	`serial` text,
	`position` text NOT NULL,
	`heads_fitted` integer DEFAULT 1 NOT NULL,
	`housing` text NOT NULL,
	`environment` text NOT NULL,
	`delay_seconds` integer,
	`delay_observed_on` text,
	`installed_on` text NOT NULL,
	`eol_ohms` integer NOT NULL,
	`eol_placement` text NOT NULL,
	`alarm_terminal` text NOT NULL,
	`supervisory_terminal` text NOT NULL,
	`conductor_awg` integer NOT NULL,
	`conductor_stranded` integer NOT NULL,
	`run_feet` integer NOT NULL,
	`test_station` text DEFAULT 'none' NOT NULL,
	`test_station_feet` integer,
	`velocity_min_fpm` integer NOT NULL,
	`velocity_max_fpm` integer NOT NULL,
	`pressure_min_in_wc` real NOT NULL,
	`pressure_max_in_wc` real NOT NULL,
	`state` text DEFAULT 'normal' NOT NULL,
	`last_visual_on` text,
	`last_functional_on` text,
	`last_sensitivity_on` text,
	`sensitivity_streak` integer DEFAULT 0 NOT NULL,
	`last_cleaned_on` text,
	`cleaning_interval_days` integer,
	`last_result` text,
	`next_due_on` text,
	`due_status` text DEFAULT 'ok' NOT NULL,
	`delay_agreement` text DEFAULT 'unknown' NOT NULL,
	`risk_score` integer DEFAULT 0 NOT NULL,
	`troubles_30d` integer DEFAULT 0 NOT NULL,
	`version` integer DEFAULT 1 NOT NULL,
	`updated_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	FOREIGN KEY (`unit_id`) REFERENCES `units`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`customer_id`) REFERENCES `customers`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`model_id`) REFERENCES `detector_models`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `detectors_unit_idx` ON `detectors` (`unit_id`);--> statement-breakpoint
CREATE INDEX `detectors_site_idx` ON `detectors` (`site_id`,`tag`);--> statement-breakpoint
CREATE INDEX `detectors_customer_idx` ON `detectors` (`customer_id`);--> statement-breakpoint
CREATE INDEX `detectors_state_idx` ON `detectors` (`state`,`risk_score`);--> statement-breakpoint
CREATE INDEX `detectors_due_idx` ON `detectors` (`due_status`,`next_due_on`);--> statement-breakpoint
CREATE INDEX `detectors_next_due_idx` ON `detectors` (`next_due_on`);--> statement-breakpoint
CREATE INDEX `detectors_risk_idx` ON `detectors` (`risk_score`);--> statement-breakpoint
CREATE INDEX `detectors_env_idx` ON `detectors` (`environment`,`housing`);--> statement-breakpoint
CREATE INDEX `detectors_delay_idx` ON `detectors` (`delay_agreement`);--> statement-breakpoint
CREATE INDEX `detectors_tag_idx` ON `detectors` (`tag`);--> statement-breakpoint
CREATE TABLE `email_outbox` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`to_address` text NOT NULL,
	`subject` text NOT NULL,
	`html` text NOT NULL,
	`text` text NOT NULL,
	`status` text DEFAULT 'queued' NOT NULL,
	`attempts` integer DEFAULT 0 NOT NULL,
	`provider_id` text,
	`error` text,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	`sent_at` text
);
--> statement-breakpoint
CREATE INDEX `email_outbox_status_idx` ON `email_outbox` (`status`,`created_at`);--> statement-breakpoint
CREATE TABLE `events` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`site_id` integer NOT NULL,
	`detector_id` integer,
	`occurred_at` text NOT NULL,
	`kind` text NOT NULL,
	`detail` text,
	`user_id` integer,
	FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`detector_id`) REFERENCES `detectors`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `events_detector_idx` ON `events` (`detector_id`,`occurred_at`);--> statement-breakpoint
CREATE INDEX `events_site_idx` ON `events` (`site_id`,`occurred_at`);--> statement-breakpoint
CREATE INDEX `events_kind_idx` ON `events` (`kind`,`occurred_at`);--> statement-breakpoint
CREATE INDEX `events_time_idx` ON `events` (`occurred_at`);--> statement-breakpoint
CREATE TABLE `monitoring_companies` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`name` text NOT NULL,
	`phone` text NOT NULL,
	`email` text,
	`notify_method` text NOT NULL,
	`notify_lead_minutes` integer DEFAULT 15 NOT NULL,
	`hours` text DEFAULT '24/7' NOT NULL,
	`notes` text,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL
);
--> statement-breakpoint
CREATE TABLE `notifications` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`site_id` integer NOT NULL,
	`visit_id` integer,
	`monitoring_company_id` integer,
	`notified_at` text NOT NULL,
	`notified_by` integer,
	`method` text NOT NULL,
	`spoke_with` text NOT NULL,
	`confirmation` text,
	`in_test_from` text NOT NULL,
	`in_test_until` text NOT NULL,
	`site_contact_told` text,
	`cleared_at` text,
	FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`visit_id`) REFERENCES `visits`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`monitoring_company_id`) REFERENCES `monitoring_companies`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`notified_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `notifications_site_idx` ON `notifications` (`site_id`,`notified_at`);--> statement-breakpoint
CREATE INDEX `notifications_visit_idx` ON `notifications` (`visit_id`);--> statement-breakpoint
CREATE TABLE `readings` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`detector_id` integer NOT NULL,
	`visit_id` integer,
	`taken_at` text NOT NULL,
	`kind` text NOT NULL,
	`value` real,
	`open` integer DEFAULT false NOT NULL,
	`taken_by` integer,
	FOREIGN KEY (`detector_id`) REFERENCES `detectors`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`visit_id`) REFERENCES `visits`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`taken_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `readings_detector_idx` ON `readings` (`detector_id`,`taken_at`);--> statement-breakpoint
CREATE TABLE `roles` (
	`key` text PRIMARY KEY NOT NULL,
	`label` text NOT NULL,
	`description` text NOT NULL
);
--> statement-breakpoint
CREATE TABLE `sessions` (
	`id` text PRIMARY KEY NOT NULL,
	`user_id` integer NOT NULL,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	`expires_at` text NOT NULL,
	`last_seen_at` text NOT NULL,
	`revoked_at` text,
	`user_agent` text,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `sessions_user_idx` ON `sessions` (`user_id`);--> statement-breakpoint
CREATE TABLE `sites` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`customer_id` integer NOT NULL,
	`name` text NOT NULL,
	`street` text NOT NULL,
	`city` text NOT NULL,
	`region` text NOT NULL,
	`postal_code` text NOT NULL,
	`time_zone` text NOT NULL,
	`jurisdiction` text NOT NULL,
	`ahj_name` text NOT NULL,
	`ahj_contact` text,
	`code_basis` text NOT NULL,
	`monitoring_company_id` integer,
	`monitoring_account` text,
	`delay_policy_seconds` integer DEFAULT 0 NOT NULL,
	`access_notes` text,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	FOREIGN KEY (`customer_id`) REFERENCES `customers`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`monitoring_company_id`) REFERENCES `monitoring_companies`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `sites_customer_idx` ON `sites` (`customer_id`,`name`);--> statement-breakpoint
CREATE INDEX `sites_region_idx` ON `sites` (`region`);--> statement-breakpoint
CREATE INDEX `sites_monitoring_idx` ON `sites` (`monitoring_company_id`);--> statement-breakpoint
CREATE TABLE `table_counts` (
	`name` text PRIMARY KEY NOT NULL,
	`rows` integer DEFAULT 0 NOT NULL
);
--> statement-breakpoint
CREATE TABLE `units` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`site_id` integer NOT NULL,
	`tag` text NOT NULL,
	`kind` text NOT NULL,
	`location` text,
	`shutdown_input` text NOT NULL,
	`supply_cfm` integer NOT NULL,
	`return_cfm` integer NOT NULL,
	`duct_shape` text NOT NULL,
	`duct_width_in` real,
	`duct_height_in` real,
	`duct_diameter_in` real,
	`storeys_served` integer DEFAULT 1 NOT NULL,
	`shared_plenum` integer DEFAULT false NOT NULL,
	`area_detection` integer DEFAULT false NOT NULL,
	`transformer_va` integer DEFAULT 40 NOT NULL,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `units_site_idx` ON `units` (`site_id`,`tag`);--> statement-breakpoint
CREATE TABLE `users` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`email` text NOT NULL,
	`name` text NOT NULL,
	`role` text NOT NULL,
	`active` integer DEFAULT true NOT NULL,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	FOREIGN KEY (`role`) REFERENCES `roles`(`key`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `users_email_unique` ON `users` (`email`);--> statement-breakpoint
CREATE TABLE `visit_detectors` (
	`visit_id` integer NOT NULL,
	`detector_id` integer NOT NULL,
	`tasks` text NOT NULL,
	`result` text DEFAULT 'pending' NOT NULL,
	`notes` text,
	`completed_at` text,
	PRIMARY KEY(`visit_id`, `detector_id`),
	FOREIGN KEY (`visit_id`) REFERENCES `visits`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`detector_id`) REFERENCES `detectors`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `visit_detectors_detector_idx` ON `visit_detectors` (`detector_id`);--> statement-breakpoint
CREATE TABLE `visits` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`site_id` integer NOT NULL,
	`kind` text NOT NULL,
	`scheduled_on` text NOT NULL,
	`technician_id` integer,
	`status` text DEFAULT 'planned' NOT NULL,
	`notes` text,
	`created_by` integer,
	`version` integer DEFAULT 1 NOT NULL,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`technician_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `visits_site_idx` ON `visits` (`site_id`,`scheduled_on`);--> statement-breakpoint
CREATE INDEX `visits_date_idx` ON `visits` (`scheduled_on`,`status`);--> statement-breakpoint
CREATE INDEX `visits_tech_idx` ON `visits` (`technician_id`,`scheduled_on`);