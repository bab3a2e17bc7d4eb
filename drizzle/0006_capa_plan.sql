ALTER TABLE `capa_actions` ADD `round` int DEFAULT 1 NOT NULL;--> statement-breakpoint
ALTER TABLE `capa_actions` ADD `completed_by` int;--> statement-breakpoint
ALTER TABLE `capa_actions` ADD `created_by` int NOT NULL;--> statement-breakpoint
ALTER TABLE `capas` ADD `plan_round` int DEFAULT 1 NOT NULL;--> statement-breakpoint
ALTER TABLE `capas` ADD `actions_planned` int DEFAULT 0 NOT NULL;--> statement-breakpoint
ALTER TABLE `capas` ADD `actions_open` int DEFAULT 0 NOT NULL;--> statement-breakpoint
ALTER TABLE `capas` ADD `actions_completed_at` datetime(3);--> statement-breakpoint
ALTER TABLE `capas` ADD `plan_approved_at` datetime(3);--> statement-breakpoint
ALTER TABLE `capas` ADD `effectiveness_opened_at` datetime(3);--> statement-breakpoint
ALTER TABLE `capa_actions` ADD CONSTRAINT `capa_actions_completed_by_users_id_fk` FOREIGN KEY (`completed_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `capa_actions` ADD CONSTRAINT `capa_actions_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;