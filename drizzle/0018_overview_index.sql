CREATE INDEX `detectors_due_env_idx` ON `detectors` (`due_status`,`environment`);--> statement-breakpoint
ANALYZE `detectors_due_env_idx`;
