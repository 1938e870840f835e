CREATE INDEX `events_trouble_idx` ON `events` (`detector_id`,`occurred_at`) WHERE kind = 'trouble';--> statement-breakpoint
CREATE INDEX `task_results_fail_idx` ON `task_results` (`done_on`,`visit_id`) WHERE outcome = 'fail';--> statement-breakpoint
-- The kept Triage totals gain a row for the reason "supervision never proven", counted once here;
-- the triggers keep it from now on.
INSERT INTO `reason_counts` (code) VALUES ('supervision-unproven');--> statement-breakpoint
UPDATE `reason_counts` SET n = (SELECT count(*) FROM detectors d WHERE d.risk_reasons != '' AND d.acknowledged_at IS NULL
  AND instr(d.risk_reasons, ',supervision-unproven,') > 0) WHERE code = 'supervision-unproven';--> statement-breakpoint
ANALYZE `task_results`;--> statement-breakpoint
ANALYZE `events`;
