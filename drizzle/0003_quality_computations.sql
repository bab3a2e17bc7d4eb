CREATE TABLE `risk_scale_levels` (
	`scale_version_id` int NOT NULL,
	`dimension` enum('severity','occurrence','detection') NOT NULL,
	`score` tinyint NOT NULL,
	`label` varchar(80) NOT NULL,
	`description` text NOT NULL,
	CONSTRAINT `risk_scale_levels_scale_version_id_dimension_score_pk` PRIMARY KEY(`scale_version_id`,`dimension`,`score`)
);
--> statement-breakpoint
CREATE TABLE `risk_scale_versions` (
	`id` int AUTO_INCREMENT NOT NULL,
	`version` int NOT NULL,
	`note` varchar(500) NOT NULL,
	`published_by` int NOT NULL,
	`published_at` datetime(3) NOT NULL,
	CONSTRAINT `risk_scale_versions_id` PRIMARY KEY(`id`),
	CONSTRAINT `risk_scale_versions_version_uq` UNIQUE(`version`)
);
--> statement-breakpoint
CREATE TABLE `site_closures` (
	`day` date NOT NULL,
	`description` varchar(200) NOT NULL,
	`active` boolean NOT NULL DEFAULT true,
	`created_by` int NOT NULL,
	`created_at` datetime(3) NOT NULL,
	CONSTRAINT `site_closures_day` PRIMARY KEY(`day`)
);
--> statement-breakpoint
CREATE TABLE `weight_checks` (
	`id` int AUTO_INCREMENT NOT NULL,
	`batch_id` int NOT NULL,
	`product_id` int NOT NULL,
	`machine_id` int,
	`ring_id` int,
	`method` enum('ph_eur_2_9_5','usp_905','usp_2091') NOT NULL,
	`mass_mode` enum('gross','net') NOT NULL,
	`shell_mass_mg` decimal(8,2),
	`masses_mg` text NOT NULL,
	`sample_size` int NOT NULL,
	`mean_mg` decimal(10,3) NOT NULL,
	`sd_mg` decimal(10,3) NOT NULL,
	`min_mg` decimal(10,3) NOT NULL,
	`max_mg` decimal(10,3) NOT NULL,
	`out_of_limit_count` int NOT NULL,
	`verdict` enum('pass','fail') NOT NULL,
	`evaluation` text NOT NULL,
	`note` varchar(1000),
	`deviation_id` int,
	`recorded_by` int NOT NULL,
	`checked_at` datetime(3) NOT NULL,
	`version` int NOT NULL DEFAULT 1,
	`created_at` datetime(3) NOT NULL,
	CONSTRAINT `weight_checks_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
ALTER TABLE `risk_scale_levels` ADD CONSTRAINT `risk_scale_levels_scale_version_id_risk_scale_versions_id_fk` FOREIGN KEY (`scale_version_id`) REFERENCES `risk_scale_versions`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `risk_scale_versions` ADD CONSTRAINT `risk_scale_versions_published_by_users_id_fk` FOREIGN KEY (`published_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `site_closures` ADD CONSTRAINT `site_closures_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `weight_checks` ADD CONSTRAINT `weight_checks_batch_id_batches_id_fk` FOREIGN KEY (`batch_id`) REFERENCES `batches`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `weight_checks` ADD CONSTRAINT `weight_checks_product_id_products_id_fk` FOREIGN KEY (`product_id`) REFERENCES `products`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `weight_checks` ADD CONSTRAINT `weight_checks_machine_id_machines_id_fk` FOREIGN KEY (`machine_id`) REFERENCES `machines`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `weight_checks` ADD CONSTRAINT `weight_checks_ring_id_filling_rings_id_fk` FOREIGN KEY (`ring_id`) REFERENCES `filling_rings`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `weight_checks` ADD CONSTRAINT `weight_checks_recorded_by_users_id_fk` FOREIGN KEY (`recorded_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `weight_checks_batch_idx` ON `weight_checks` (`batch_id`,`checked_at`);--> statement-breakpoint
CREATE INDEX `weight_checks_machine_idx` ON `weight_checks` (`machine_id`,`checked_at`);--> statement-breakpoint
CREATE INDEX `weight_checks_checked_idx` ON `weight_checks` (`checked_at`);--> statement-breakpoint
CREATE INDEX `weight_checks_verdict_idx` ON `weight_checks` (`verdict`,`checked_at`);