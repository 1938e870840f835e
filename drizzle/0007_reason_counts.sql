-- Open triage-queue totals kept in step with detectors: a detector is open while the derivation gave
-- it a reason (risk_reasons not empty) and nobody acknowledged it. Each trigger touches only the
-- eleven rows of reason_counts. Trigger names carry '_count_' so bulk loads set them aside.
INSERT INTO `reason_counts` (code) VALUES ('open'), ('in-trouble'), ('in-alarm'), ('out-of-service'), ('overdue'), ('failed-test'), ('failed-diagnosis'), ('repeated-troubles'), ('humid-unrated'), ('delay-disagrees'), ('delay-unknown');
--> statement-breakpoint
UPDATE `reason_counts` SET n = (SELECT count(*) FROM detectors d WHERE d.risk_reasons != '' AND d.acknowledged_at IS NULL
  AND (reason_counts.code = 'open' OR instr(d.risk_reasons, ',' || reason_counts.code || ',') > 0));
--> statement-breakpoint
CREATE TRIGGER `detectors_count_reasons_ai` AFTER INSERT ON `detectors` WHEN new.risk_reasons != '' AND new.acknowledged_at IS NULL BEGIN
  UPDATE reason_counts SET n = n + 1 WHERE (code = 'open' OR instr(new.risk_reasons, ',' || code || ',') > 0);
END;
--> statement-breakpoint
CREATE TRIGGER `detectors_count_reasons_ad` AFTER DELETE ON `detectors` WHEN old.risk_reasons != '' AND old.acknowledged_at IS NULL BEGIN
  UPDATE reason_counts SET n = n - 1 WHERE (code = 'open' OR instr(old.risk_reasons, ',' || code || ',') > 0);
END;
--> statement-breakpoint
CREATE TRIGGER `detectors_count_reasons_au` AFTER UPDATE OF risk_reasons, acknowledged_at ON `detectors`
WHEN old.risk_reasons IS NOT new.risk_reasons OR (old.acknowledged_at IS NULL) != (new.acknowledged_at IS NULL) BEGIN
  UPDATE reason_counts SET n = n - 1 WHERE old.risk_reasons != '' AND old.acknowledged_at IS NULL AND (code = 'open' OR instr(old.risk_reasons, ',' || code || ',') > 0);
  UPDATE reason_counts SET n = n + 1 WHERE new.risk_reasons != '' AND new.acknowledged_at IS NULL AND (code = 'open' OR instr(new.risk_reasons, ',' || code || ',') > 0);
END;
