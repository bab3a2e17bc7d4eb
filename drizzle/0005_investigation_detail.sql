ALTER TABLE `deviations` ADD `five_whys` text;--> statement-breakpoint
ALTER TABLE `deviations` ADD `cause_analysis` text;