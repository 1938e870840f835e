CREATE INDEX `customers_kind_idx` ON `customers` (`kind`);--> statement-breakpoint
CREATE INDEX `customers_kind_name_idx` ON `customers` (`kind`,`name`);--> statement-breakpoint
CREATE INDEX `detectors_state_sort_idx` ON `detectors` (`state`);--> statement-breakpoint
CREATE INDEX `detectors_due_sort_idx` ON `detectors` (`due_status`);--> statement-breakpoint
CREATE INDEX `detectors_due_risk_idx` ON `detectors` (`due_status`,`risk_score`);--> statement-breakpoint
CREATE INDEX `detectors_env_sort_idx` ON `detectors` (`environment`);--> statement-breakpoint
CREATE INDEX `detectors_env_risk_idx` ON `detectors` (`environment`,`risk_score`);--> statement-breakpoint
CREATE INDEX `detectors_housing_risk_idx` ON `detectors` (`housing`,`risk_score`);--> statement-breakpoint
CREATE INDEX `detectors_delay_risk_idx` ON `detectors` (`delay_agreement`,`risk_score`);--> statement-breakpoint
CREATE INDEX `detectors_loop_idx` ON `detectors` (`loop_verdict`);--> statement-breakpoint
CREATE INDEX `detectors_loop_risk_idx` ON `detectors` (`loop_verdict`,`risk_score`);--> statement-breakpoint
CREATE INDEX `detectors_position_idx` ON `detectors` (`position`);--> statement-breakpoint
CREATE INDEX `detectors_last_functional_idx` ON `detectors` (`last_functional_on`);--> statement-breakpoint
CREATE INDEX `detectors_installed_idx` ON `detectors` (`installed_on`);--> statement-breakpoint
CREATE INDEX `detectors_customer_state_idx` ON `detectors` (`customer_id`,`state`);--> statement-breakpoint
CREATE INDEX `detectors_open_risk_idx` ON `detectors` (`risk_score`) WHERE risk_reasons <> '';--> statement-breakpoint
CREATE INDEX `detectors_open_state_idx` ON `detectors` (`state`) WHERE risk_reasons <> '';--> statement-breakpoint
CREATE INDEX `detectors_open_due_idx` ON `detectors` (`due_status`) WHERE risk_reasons <> '';--> statement-breakpoint
CREATE INDEX `detectors_open_tag_idx` ON `detectors` (`tag`) WHERE risk_reasons <> '';--> statement-breakpoint
CREATE INDEX `detectors_reason_in_trouble_idx` ON `detectors` (`risk_score`) WHERE risk_reasons like '%,in-trouble,%';--> statement-breakpoint
CREATE INDEX `detectors_reason_in_alarm_idx` ON `detectors` (`risk_score`) WHERE risk_reasons like '%,in-alarm,%';--> statement-breakpoint
CREATE INDEX `detectors_reason_out_of_service_idx` ON `detectors` (`risk_score`) WHERE risk_reasons like '%,out-of-service,%';--> statement-breakpoint
CREATE INDEX `detectors_reason_overdue_idx` ON `detectors` (`risk_score`) WHERE risk_reasons like '%,overdue,%';--> statement-breakpoint
CREATE INDEX `detectors_reason_failed_test_idx` ON `detectors` (`risk_score`) WHERE risk_reasons like '%,failed-test,%';--> statement-breakpoint
CREATE INDEX `detectors_reason_failed_diagnosis_idx` ON `detectors` (`risk_score`) WHERE risk_reasons like '%,failed-diagnosis,%';--> statement-breakpoint
CREATE INDEX `detectors_reason_repeated_troubles_idx` ON `detectors` (`risk_score`) WHERE risk_reasons like '%,repeated-troubles,%';--> statement-breakpoint
CREATE INDEX `detectors_reason_humid_unrated_idx` ON `detectors` (`risk_score`) WHERE risk_reasons like '%,humid-unrated,%';--> statement-breakpoint
CREATE INDEX `detectors_reason_delay_disagrees_idx` ON `detectors` (`risk_score`) WHERE risk_reasons like '%,delay-disagrees,%';--> statement-breakpoint
CREATE INDEX `detectors_reason_delay_unknown_idx` ON `detectors` (`risk_score`) WHERE risk_reasons like '%,delay-unknown,%';--> statement-breakpoint
CREATE INDEX `detectors_reason_supervision_unproven_idx` ON `detectors` (`risk_score`) WHERE risk_reasons like '%,supervision-unproven,%';--> statement-breakpoint
CREATE INDEX `sites_name_idx` ON `sites` (`name`);--> statement-breakpoint
CREATE INDEX `sites_city_idx` ON `sites` (`city`);--> statement-breakpoint
CREATE INDEX `sites_code_basis_idx` ON `sites` (`code_basis`);--> statement-breakpoint
CREATE INDEX `sites_code_basis_name_idx` ON `sites` (`code_basis`,`name`);--> statement-breakpoint
CREATE INDEX `sites_delay_policy_idx` ON `sites` (`delay_policy_seconds`);--> statement-breakpoint
CREATE INDEX `units_tag_idx` ON `units` (`tag`);--> statement-breakpoint
CREATE INDEX `visits_kind_idx` ON `visits` (`kind`);--> statement-breakpoint
CREATE INDEX `visits_kind_day_idx` ON `visits` (`kind`,`scheduled_on`);--> statement-breakpoint
CREATE INDEX `visits_status_idx` ON `visits` (`status`);--> statement-breakpoint
CREATE INDEX `visits_status_day_idx` ON `visits` (`status`,`scheduled_on`);--> statement-breakpoint
-- Statistics for the new indexes: without them SQLite guesses each is highly selective and may walk
-- one that needs a sort over the one that holds the order (a filter by state sorted by risk).
ANALYZE `customers`;--> statement-breakpoint
ANALYZE `sites`;--> statement-breakpoint
ANALYZE `units`;--> statement-breakpoint
ANALYZE `detectors`;--> statement-breakpoint
ANALYZE `visits`;
