CREATE TABLE `digest_customers` (
	`user_id` integer NOT NULL,
	`customer_id` integer NOT NULL,
	PRIMARY KEY(`user_id`, `customer_id`),
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`customer_id`) REFERENCES `customers`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE TABLE `digest_settings` (
	`user_id` integer PRIMARY KEY NOT NULL,
	`enabled` integer DEFAULT true NOT NULL,
	`weekday` integer DEFAULT 1 NOT NULL,
	`hour` integer DEFAULT 7 NOT NULL,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
ALTER TABLE `email_outbox` ADD `kind` text DEFAULT 'notice' NOT NULL;--> statement-breakpoint
ALTER TABLE `email_outbox` ADD `idempotency_key` text;--> statement-breakpoint
ALTER TABLE `email_outbox` ADD `recipient_user_id` integer REFERENCES users(id);--> statement-breakpoint
ALTER TABLE `email_outbox` ADD `visit_id` integer REFERENCES visits(id);--> statement-breakpoint
ALTER TABLE `email_outbox` ADD `next_attempt_at` text;--> statement-breakpoint
CREATE UNIQUE INDEX `email_outbox_key_idx` ON `email_outbox` (`idempotency_key`) WHERE idempotency_key is not null;