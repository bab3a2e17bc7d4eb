-- Written by hand after `npm run db:generate`: the generated statements add the primary key before its column, add an AUTO_INCREMENT column that is not yet a key, and add scale_version empty (every row 0, then a unique index over them), so they cannot run on a database with rows. These keep every row: the snapshot is the generated one.
-- Risk scale versions: the scale's own number moves to scale_version, unchanged; version becomes the row's own, 1 for every row (the table is append-only).
ALTER TABLE `risk_scale_versions` DROP INDEX `risk_scale_versions_version_uq`;--> statement-breakpoint
ALTER TABLE `risk_scale_versions` RENAME COLUMN `version` TO `scale_version`;--> statement-breakpoint
ALTER TABLE `risk_scale_versions` ADD `version` int NOT NULL DEFAULT 1;--> statement-breakpoint
ALTER TABLE `risk_scale_versions` ADD CONSTRAINT `risk_scale_versions_scale_version_uq` UNIQUE(`scale_version`);--> statement-breakpoint
-- Site closures: an id (existing rows keep their day and are numbered in day order, the old key's order) and a version.
ALTER TABLE `site_closures` DROP PRIMARY KEY, ADD `id` int AUTO_INCREMENT NOT NULL PRIMARY KEY FIRST;--> statement-breakpoint
ALTER TABLE `site_closures` ADD `version` int NOT NULL DEFAULT 1;--> statement-breakpoint
ALTER TABLE `site_closures` ADD CONSTRAINT `site_closures_day_uq` UNIQUE(`day`);
