DROP INDEX `task_results_detector_idx`;--> statement-breakpoint
CREATE INDEX `task_results_history_idx` ON `task_results` (`detector_id`,`task`,`done_on`,`outcome`);