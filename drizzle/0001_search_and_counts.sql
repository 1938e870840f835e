-- Full-text search over the names, tags and addresses people type into the palette.
-- rowid encodes the entity: id * 4 + (0 customer, 1 site, 2 unit, 3 detector), so triggers can find a row.
CREATE VIRTUAL TABLE `search_index` USING fts5(kind UNINDEXED, ref_id UNINDEXED, title, detail, tokenize = 'unicode61 remove_diacritics 2', prefix = '2 3');
--> statement-breakpoint
CREATE TRIGGER `customers_search_ai` AFTER INSERT ON `customers` BEGIN
  INSERT INTO search_index (rowid, kind, ref_id, title, detail) VALUES (NEW.id * 4 + 0, 'customer', NEW.id, NEW.name, NEW.kind);
END;
--> statement-breakpoint
CREATE TRIGGER `customers_search_au` AFTER UPDATE OF name, kind ON `customers` BEGIN
  DELETE FROM search_index WHERE rowid = OLD.id * 4 + 0;
  INSERT INTO search_index (rowid, kind, ref_id, title, detail) VALUES (NEW.id * 4 + 0, 'customer', NEW.id, NEW.name, NEW.kind);
END;
--> statement-breakpoint
CREATE TRIGGER `customers_search_ad` AFTER DELETE ON `customers` BEGIN
  DELETE FROM search_index WHERE rowid = OLD.id * 4 + 0;
END;
--> statement-breakpoint
CREATE TRIGGER `sites_search_ai` AFTER INSERT ON `sites` BEGIN
  INSERT INTO search_index (rowid, kind, ref_id, title, detail) VALUES (NEW.id * 4 + 1, 'site', NEW.id, NEW.name, NEW.street || ' ' || NEW.city || ' ' || NEW.postal_code || ' ' || NEW.region);
END;
--> statement-breakpoint
CREATE TRIGGER `sites_search_au` AFTER UPDATE OF name, street, city, postal_code, region ON `sites` BEGIN
  DELETE FROM search_index WHERE rowid = OLD.id * 4 + 1;
  INSERT INTO search_index (rowid, kind, ref_id, title, detail) VALUES (NEW.id * 4 + 1, 'site', NEW.id, NEW.name, NEW.street || ' ' || NEW.city || ' ' || NEW.postal_code || ' ' || NEW.region);
END;
--> statement-breakpoint
CREATE TRIGGER `sites_search_ad` AFTER DELETE ON `sites` BEGIN
  DELETE FROM search_index WHERE rowid = OLD.id * 4 + 1;
END;
--> statement-breakpoint
CREATE TRIGGER `units_search_ai` AFTER INSERT ON `units` BEGIN
  INSERT INTO search_index (rowid, kind, ref_id, title, detail) VALUES (NEW.id * 4 + 2, 'unit', NEW.id, NEW.tag, coalesce(NEW.location, '') || ' ' || (SELECT name || ' ' || city FROM sites WHERE id = NEW.site_id));
END;
--> statement-breakpoint
CREATE TRIGGER `units_search_au` AFTER UPDATE OF tag, location, site_id ON `units` BEGIN
  DELETE FROM search_index WHERE rowid = OLD.id * 4 + 2;
  INSERT INTO search_index (rowid, kind, ref_id, title, detail) VALUES (NEW.id * 4 + 2, 'unit', NEW.id, NEW.tag, coalesce(NEW.location, '') || ' ' || (SELECT name || ' ' || city FROM sites WHERE id = NEW.site_id));
END;
--> statement-breakpoint
CREATE TRIGGER `units_search_ad` AFTER DELETE ON `units` BEGIN
  DELETE FROM search_index WHERE rowid = OLD.id * 4 + 2;
END;
--> statement-breakpoint
CREATE TRIGGER `detectors_search_ai` AFTER INSERT ON `detectors` BEGIN
  INSERT INTO search_index (rowid, kind, ref_id, title, detail) VALUES (NEW.id * 4 + 3, 'detector', NEW.id, NEW.tag, coalesce(NEW.serial, '') || ' ' || (SELECT name || ' ' || street || ' ' || city FROM sites WHERE id = NEW.site_id));
END;
--> statement-breakpoint
CREATE TRIGGER `detectors_search_au` AFTER UPDATE OF tag, serial, site_id ON `detectors` BEGIN
  DELETE FROM search_index WHERE rowid = OLD.id * 4 + 3;
  INSERT INTO search_index (rowid, kind, ref_id, title, detail) VALUES (NEW.id * 4 + 3, 'detector', NEW.id, NEW.tag, coalesce(NEW.serial, '') || ' ' || (SELECT name || ' ' || street || ' ' || city FROM sites WHERE id = NEW.site_id));
END;
--> statement-breakpoint
CREATE TRIGGER `detectors_search_ad` AFTER DELETE ON `detectors` BEGIN
  DELETE FROM search_index WHERE rowid = OLD.id * 4 + 3;
END;
--> statement-breakpoint
-- Row totals kept with the writes, so the console never recounts millions of rows for a page.
INSERT INTO `table_counts` (name, rows) VALUES ('customers', (SELECT count(*) FROM `customers`)), ('sites', (SELECT count(*) FROM `sites`)), ('units', (SELECT count(*) FROM `units`)), ('detectors', (SELECT count(*) FROM `detectors`)), ('events', (SELECT count(*) FROM `events`)), ('readings', (SELECT count(*) FROM `readings`)), ('visits', (SELECT count(*) FROM `visits`)), ('notifications', (SELECT count(*) FROM `notifications`)), ('audit_log', (SELECT count(*) FROM `audit_log`));
--> statement-breakpoint
CREATE TRIGGER `customers_count_ai` AFTER INSERT ON `customers` BEGIN UPDATE table_counts SET rows = rows + 1 WHERE name = 'customers'; END;
--> statement-breakpoint
CREATE TRIGGER `customers_count_ad` AFTER DELETE ON `customers` BEGIN UPDATE table_counts SET rows = rows - 1 WHERE name = 'customers'; END;
--> statement-breakpoint
CREATE TRIGGER `sites_count_ai` AFTER INSERT ON `sites` BEGIN UPDATE table_counts SET rows = rows + 1 WHERE name = 'sites'; END;
--> statement-breakpoint
CREATE TRIGGER `sites_count_ad` AFTER DELETE ON `sites` BEGIN UPDATE table_counts SET rows = rows - 1 WHERE name = 'sites'; END;
--> statement-breakpoint
CREATE TRIGGER `units_count_ai` AFTER INSERT ON `units` BEGIN UPDATE table_counts SET rows = rows + 1 WHERE name = 'units'; END;
--> statement-breakpoint
CREATE TRIGGER `units_count_ad` AFTER DELETE ON `units` BEGIN UPDATE table_counts SET rows = rows - 1 WHERE name = 'units'; END;
--> statement-breakpoint
CREATE TRIGGER `detectors_count_ai` AFTER INSERT ON `detectors` BEGIN UPDATE table_counts SET rows = rows + 1 WHERE name = 'detectors'; END;
--> statement-breakpoint
CREATE TRIGGER `detectors_count_ad` AFTER DELETE ON `detectors` BEGIN UPDATE table_counts SET rows = rows - 1 WHERE name = 'detectors'; END;
--> statement-breakpoint
CREATE TRIGGER `events_count_ai` AFTER INSERT ON `events` BEGIN UPDATE table_counts SET rows = rows + 1 WHERE name = 'events'; END;
--> statement-breakpoint
CREATE TRIGGER `events_count_ad` AFTER DELETE ON `events` BEGIN UPDATE table_counts SET rows = rows - 1 WHERE name = 'events'; END;
--> statement-breakpoint
CREATE TRIGGER `readings_count_ai` AFTER INSERT ON `readings` BEGIN UPDATE table_counts SET rows = rows + 1 WHERE name = 'readings'; END;
--> statement-breakpoint
CREATE TRIGGER `readings_count_ad` AFTER DELETE ON `readings` BEGIN UPDATE table_counts SET rows = rows - 1 WHERE name = 'readings'; END;
--> statement-breakpoint
CREATE TRIGGER `visits_count_ai` AFTER INSERT ON `visits` BEGIN UPDATE table_counts SET rows = rows + 1 WHERE name = 'visits'; END;
--> statement-breakpoint
CREATE TRIGGER `visits_count_ad` AFTER DELETE ON `visits` BEGIN UPDATE table_counts SET rows = rows - 1 WHERE name = 'visits'; END;
--> statement-breakpoint
CREATE TRIGGER `notifications_count_ai` AFTER INSERT ON `notifications` BEGIN UPDATE table_counts SET rows = rows + 1 WHERE name = 'notifications'; END;
--> statement-breakpoint
CREATE TRIGGER `notifications_count_ad` AFTER DELETE ON `notifications` BEGIN UPDATE table_counts SET rows = rows - 1 WHERE name = 'notifications'; END;
--> statement-breakpoint
CREATE TRIGGER `audit_log_count_ai` AFTER INSERT ON `audit_log` BEGIN UPDATE table_counts SET rows = rows + 1 WHERE name = 'audit_log'; END;
--> statement-breakpoint
CREATE TRIGGER `audit_log_count_ad` AFTER DELETE ON `audit_log` BEGIN UPDATE table_counts SET rows = rows - 1 WHERE name = 'audit_log'; END;
