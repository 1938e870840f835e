CREATE INDEX `detectors_customer_due_idx` ON `detectors` (`customer_id`,`due_status`,`state`);--> statement-breakpoint
CREATE INDEX `detectors_site_due_idx` ON `detectors` (`site_id`,`due_status`);