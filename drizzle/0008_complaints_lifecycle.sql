ALTER TABLE `complaints` ADD `defect_id` int;--> statement-breakpoint
ALTER TABLE `complaints` ADD `reportability_decided_at` datetime(3);--> statement-breakpoint
ALTER TABLE `complaints` ADD `reportability_decided_by` int;--> statement-breakpoint
ALTER TABLE `complaints` ADD `investigation_skip_reason` text;--> statement-breakpoint
ALTER TABLE `complaints` ADD `retained_samples_checked` boolean;--> statement-breakpoint
ALTER TABLE `complaints` ADD `retained_samples_note` text;--> statement-breakpoint
ALTER TABLE `complaints` ADD `response_channel` enum('email','post');--> statement-breakpoint
ALTER TABLE `complaints` ADD `response_sent_text` text;--> statement-breakpoint
ALTER TABLE `complaints` ADD `response_sent_by` int;--> statement-breakpoint
ALTER TABLE `complaints` ADD `reopen_reason` text;--> statement-breakpoint
ALTER TABLE `complaints` ADD CONSTRAINT `complaints_defect_id_capsule_defects_id_fk` FOREIGN KEY (`defect_id`) REFERENCES `capsule_defects`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `complaints` ADD CONSTRAINT `complaints_reportability_decided_by_users_id_fk` FOREIGN KEY (`reportability_decided_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `complaints` ADD CONSTRAINT `complaints_response_sent_by_users_id_fk` FOREIGN KEY (`response_sent_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `complaints_created_by_idx` ON `complaints` (`created_by`,`received_on`);