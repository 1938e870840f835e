CREATE INDEX `audit_actor_idx` ON `audit_log` (`actor_id`,`id`);--> statement-breakpoint
CREATE INDEX `audit_action_idx` ON `audit_log` (`action`,`id`);