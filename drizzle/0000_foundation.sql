CREATE TABLE `settings` (
	`key` varchar(64) NOT NULL,
	`value` varchar(1000) NOT NULL,
	`updated_at` datetime(3) NOT NULL,
	CONSTRAINT `settings_key` PRIMARY KEY(`key`)
);
--> statement-breakpoint
CREATE TABLE `users` (
	`id` int AUTO_INCREMENT NOT NULL,
	`email` varchar(254) NOT NULL,
	`name` varchar(120) NOT NULL,
	`title` varchar(120) NOT NULL DEFAULT '',
	`role` enum('operator','supervisor','qa_investigator','qa_approver','admin') NOT NULL,
	`password_hash` varchar(100) NOT NULL,
	`active` boolean NOT NULL DEFAULT true,
	`failed_signins` int NOT NULL DEFAULT 0,
	`locked_until` datetime(3),
	`last_signin_at` datetime(3),
	`password_changed_at` datetime(3),
	`version` int NOT NULL DEFAULT 1,
	`created_at` datetime(3) NOT NULL,
	`updated_at` datetime(3) NOT NULL,
	CONSTRAINT `users_id` PRIMARY KEY(`id`),
	CONSTRAINT `users_email_uq` UNIQUE(`email`)
);
--> statement-breakpoint
CREATE TABLE `batches` (
	`id` int AUTO_INCREMENT NOT NULL,
	`lot_number` varchar(40) NOT NULL,
	`product_id` int NOT NULL,
	`machine_id` int,
	`ring_id` int,
	`size_capsules` int NOT NULL,
	`units_shipped` int NOT NULL DEFAULT 0,
	`status` enum('in_process','on_hold','released','rejected') NOT NULL DEFAULT 'in_process',
	`manufactured_on` date NOT NULL,
	`expires_on` date,
	`version` int NOT NULL DEFAULT 1,
	`created_at` datetime(3) NOT NULL,
	`updated_at` datetime(3) NOT NULL,
	CONSTRAINT `batches_id` PRIMARY KEY(`id`),
	CONSTRAINT `batches_lot_uq` UNIQUE(`lot_number`)
);
--> statement-breakpoint
CREATE TABLE `capsule_defects` (
	`id` int AUTO_INCREMENT NOT NULL,
	`code` varchar(32) NOT NULL,
	`name` varchar(120) NOT NULL,
	`description` text NOT NULL,
	`default_classification` enum('critical','major','minor') NOT NULL,
	`default_severity` tinyint NOT NULL,
	`caution` text,
	`active` boolean NOT NULL DEFAULT true,
	`version` int NOT NULL DEFAULT 1,
	`created_at` datetime(3) NOT NULL,
	`updated_at` datetime(3) NOT NULL,
	CONSTRAINT `capsule_defects_id` PRIMARY KEY(`id`),
	CONSTRAINT `capsule_defects_code_uq` UNIQUE(`code`)
);
--> statement-breakpoint
CREATE TABLE `filling_rings` (
	`id` int AUTO_INCREMENT NOT NULL,
	`serial` varchar(40) NOT NULL,
	`machine_id` int NOT NULL,
	`capsule_size` enum('000','00','0','1','2','3','4','5') NOT NULL,
	`condition` enum('good','worn','dented','damaged') NOT NULL DEFAULT 'good',
	`status` enum('in_service','quarantined','retired') NOT NULL DEFAULT 'in_service',
	`status_reason` varchar(500),
	`retired_at` datetime(3),
	`version` int NOT NULL DEFAULT 1,
	`created_at` datetime(3) NOT NULL,
	`updated_at` datetime(3) NOT NULL,
	CONSTRAINT `filling_rings_id` PRIMARY KEY(`id`),
	CONSTRAINT `filling_rings_serial_uq` UNIQUE(`serial`)
);
--> statement-breakpoint
CREATE TABLE `machines` (
	`id` int AUTO_INCREMENT NOT NULL,
	`asset_tag` varchar(32) NOT NULL,
	`name` varchar(120) NOT NULL,
	`room` varchar(60) NOT NULL,
	`model` varchar(120) NOT NULL,
	`capsule_sizes` varchar(60) NOT NULL,
	`active` boolean NOT NULL DEFAULT true,
	`version` int NOT NULL DEFAULT 1,
	`created_at` datetime(3) NOT NULL,
	`updated_at` datetime(3) NOT NULL,
	CONSTRAINT `machines_id` PRIMARY KEY(`id`),
	CONSTRAINT `machines_asset_tag_uq` UNIQUE(`asset_tag`)
);
--> statement-breakpoint
CREATE TABLE `products` (
	`id` int AUTO_INCREMENT NOT NULL,
	`code` varchar(32) NOT NULL,
	`name` varchar(160) NOT NULL,
	`strength` varchar(80) NOT NULL,
	`capsule_size` enum('000','00','0','1','2','3','4','5') NOT NULL,
	`shell_material` enum('gelatin','hpmc') NOT NULL,
	`regulatory_class` enum('supplement','drug') NOT NULL,
	`target_fill_mg` decimal(8,2) NOT NULL,
	`fill_lower_mg` decimal(8,2) NOT NULL,
	`fill_upper_mg` decimal(8,2) NOT NULL,
	`active` boolean NOT NULL DEFAULT true,
	`version` int NOT NULL DEFAULT 1,
	`created_at` datetime(3) NOT NULL,
	`updated_at` datetime(3) NOT NULL,
	CONSTRAINT `products_id` PRIMARY KEY(`id`),
	CONSTRAINT `products_code_uq` UNIQUE(`code`)
);
--> statement-breakpoint
CREATE TABLE `attachments` (
	`id` int AUTO_INCREMENT NOT NULL,
	`record_type` varchar(32) NOT NULL,
	`record_id` int NOT NULL,
	`object_key` varchar(255) NOT NULL,
	`file_name` varchar(255) NOT NULL,
	`content_type` varchar(127) NOT NULL,
	`size_bytes` bigint NOT NULL,
	`sha256` char(64) NOT NULL,
	`uploaded_by` int NOT NULL,
	`created_at` datetime(3) NOT NULL,
	CONSTRAINT `attachments_id` PRIMARY KEY(`id`),
	CONSTRAINT `attachments_object_key_uq` UNIQUE(`object_key`)
);
--> statement-breakpoint
CREATE TABLE `audit_chain_head` (
	`id` int NOT NULL,
	`last_entry_id` bigint NOT NULL,
	`last_hash` char(64) NOT NULL,
	CONSTRAINT `audit_chain_head_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `audit_entries` (
	`id` bigint AUTO_INCREMENT NOT NULL,
	`at` datetime(3) NOT NULL,
	`user_id` int,
	`user_name` varchar(120) NOT NULL,
	`record_type` varchar(32) NOT NULL,
	`record_id` int NOT NULL,
	`action` varchar(64) NOT NULL,
	`changes` text NOT NULL,
	`reason` text,
	`prev_hash` char(64) NOT NULL,
	`hash` char(64) NOT NULL,
	CONSTRAINT `audit_entries_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `comments` (
	`id` int AUTO_INCREMENT NOT NULL,
	`record_type` varchar(32) NOT NULL,
	`record_id` int NOT NULL,
	`user_id` int NOT NULL,
	`body` text NOT NULL,
	`created_at` datetime(3) NOT NULL,
	CONSTRAINT `comments_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `record_counters` (
	`prefix` varchar(8) NOT NULL,
	`year` smallint NOT NULL,
	`last_value` int NOT NULL,
	CONSTRAINT `record_counters_prefix_year_pk` PRIMARY KEY(`prefix`,`year`)
);
--> statement-breakpoint
CREATE TABLE `record_links` (
	`id` int AUTO_INCREMENT NOT NULL,
	`from_type` varchar(32) NOT NULL,
	`from_id` int NOT NULL,
	`to_type` varchar(32) NOT NULL,
	`to_id` int NOT NULL,
	`relation` varchar(32) NOT NULL,
	`created_by` int NOT NULL,
	`created_at` datetime(3) NOT NULL,
	CONSTRAINT `record_links_id` PRIMARY KEY(`id`),
	CONSTRAINT `record_links_uq` UNIQUE(`from_type`,`from_id`,`to_type`,`to_id`,`relation`)
);
--> statement-breakpoint
CREATE TABLE `signatures` (
	`id` int AUTO_INCREMENT NOT NULL,
	`record_type` varchar(32) NOT NULL,
	`record_id` int NOT NULL,
	`user_id` int NOT NULL,
	`printed_name` varchar(120) NOT NULL,
	`printed_title` varchar(120) NOT NULL,
	`meaning` varchar(48) NOT NULL,
	`signed_at` datetime(3) NOT NULL,
	`record_version` int NOT NULL,
	`content_hash` char(64) NOT NULL,
	`signature_hash` char(64) NOT NULL,
	CONSTRAINT `signatures_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `state_history` (
	`id` bigint AUTO_INCREMENT NOT NULL,
	`record_type` varchar(32) NOT NULL,
	`record_id` int NOT NULL,
	`event` varchar(48) NOT NULL,
	`from_state` varchar(32),
	`to_state` varchar(32) NOT NULL,
	`user_id` int NOT NULL,
	`comment` text,
	`at` datetime(3) NOT NULL,
	CONSTRAINT `state_history_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `action_tokens` (
	`id` int AUTO_INCREMENT NOT NULL,
	`token_hash` char(64) NOT NULL,
	`user_id` int NOT NULL,
	`record_type` varchar(32) NOT NULL,
	`record_id` int NOT NULL,
	`action` varchar(48) NOT NULL,
	`record_version` int NOT NULL,
	`expires_at` datetime(3) NOT NULL,
	`used_at` datetime(3),
	`revoked_at` datetime(3),
	`created_at` datetime(3) NOT NULL,
	CONSTRAINT `action_tokens_id` PRIMARY KEY(`id`),
	CONSTRAINT `action_tokens_hash_uq` UNIQUE(`token_hash`)
);
--> statement-breakpoint
CREATE TABLE `mail_attempts` (
	`id` bigint AUTO_INCREMENT NOT NULL,
	`outbox_id` bigint NOT NULL,
	`worker` varchar(64) NOT NULL,
	`started_at` datetime(3) NOT NULL,
	`finished_at` datetime(3),
	`outcome` enum('started','sent','failed') NOT NULL,
	`error` varchar(1000),
	CONSTRAINT `mail_attempts_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `mail_outbox` (
	`id` bigint AUTO_INCREMENT NOT NULL,
	`dedupe_key` varchar(191) NOT NULL,
	`template` varchar(48) NOT NULL,
	`to_address` varchar(254) NOT NULL,
	`to_user_id` int,
	`subject` varchar(255) NOT NULL,
	`text_body` text NOT NULL,
	`html_body` text NOT NULL,
	`record_type` varchar(32),
	`record_id` int,
	`status` enum('pending','sending','sent','failed') NOT NULL DEFAULT 'pending',
	`attempts` int NOT NULL DEFAULT 0,
	`next_attempt_at` datetime(3) NOT NULL,
	`claimed_by` varchar(64),
	`claimed_at` datetime(3),
	`sent_at` datetime(3),
	`message_id` varchar(191) NOT NULL,
	`last_error` varchar(1000),
	`created_at` datetime(3) NOT NULL,
	CONSTRAINT `mail_outbox_id` PRIMARY KEY(`id`),
	CONSTRAINT `mail_outbox_dedupe_uq` UNIQUE(`dedupe_key`)
);
--> statement-breakpoint
CREATE TABLE `deviation_batches` (
	`deviation_id` int NOT NULL,
	`batch_id` int NOT NULL,
	`on_hold` boolean NOT NULL DEFAULT true,
	`recommended_disposition` enum('release','reject','rework','re_inspect'),
	`disposition` enum('release','reject','rework','re_inspect'),
	`disposition_note` text,
	`sampling_plan` varchar(120),
	CONSTRAINT `deviation_batches_deviation_id_batch_id_pk` PRIMARY KEY(`deviation_id`,`batch_id`)
);
--> statement-breakpoint
CREATE TABLE `deviations` (
	`id` int AUTO_INCREMENT NOT NULL,
	`number` varchar(20),
	`status` enum('draft','reported','triage','investigation','approval','closed','cancelled') NOT NULL DEFAULT 'draft',
	`version` int NOT NULL DEFAULT 1,
	`title` varchar(200) NOT NULL,
	`what_happened` text NOT NULL,
	`immediate_actions` text,
	`line_stopped` boolean NOT NULL DEFAULT false,
	`capsules_segregated` boolean NOT NULL DEFAULT false,
	`affected_count` int,
	`sample_description` varchar(255),
	`defect_id` int,
	`product_id` int,
	`batch_id` int,
	`machine_id` int,
	`ring_id` int,
	`classification` enum('critical','major','minor'),
	`classification_reason` text,
	`severity` tinyint,
	`occurrence` tinyint,
	`detection` tinyint,
	`rpn` smallint,
	`risk_scale_version` int,
	`investigation_report` text,
	`root_cause_category` varchar(32),
	`root_cause` text,
	`product_impact` text,
	`capa_required` boolean,
	`closure_justification` text,
	`cancel_reason` text,
	`raised_by` int NOT NULL,
	`owner_id` int,
	`investigator_id` int,
	`occurred_at` datetime(3) NOT NULL,
	`reported_at` datetime(3),
	`due_at` datetime(3),
	`closed_at` datetime(3),
	`created_at` datetime(3) NOT NULL,
	`updated_at` datetime(3) NOT NULL,
	CONSTRAINT `deviations_id` PRIMARY KEY(`id`),
	CONSTRAINT `deviations_number_uq` UNIQUE(`number`)
);
--> statement-breakpoint
CREATE TABLE `capa_actions` (
	`id` int AUTO_INCREMENT NOT NULL,
	`capa_id` int NOT NULL,
	`kind` enum('corrective','preventive') NOT NULL,
	`category` varchar(32) NOT NULL,
	`description` text NOT NULL,
	`owner_id` int NOT NULL,
	`due_at` datetime(3) NOT NULL,
	`completed_at` datetime(3),
	`evidence` text,
	`version` int NOT NULL DEFAULT 1,
	`created_at` datetime(3) NOT NULL,
	`updated_at` datetime(3) NOT NULL,
	CONSTRAINT `capa_actions_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `capas` (
	`id` int AUTO_INCREMENT NOT NULL,
	`number` varchar(20) NOT NULL,
	`status` enum('proposed','plan_approved','implementation','effectiveness_check','closed_effective','cancelled') NOT NULL DEFAULT 'proposed',
	`version` int NOT NULL DEFAULT 1,
	`title` varchar(200) NOT NULL,
	`source_type` enum('deviation','complaint','trend') NOT NULL,
	`source_id` int,
	`problem_statement` text NOT NULL,
	`root_cause` text,
	`effectiveness_criteria` text,
	`recurrence_criterion` text,
	`effectiveness_result` enum('effective','not_effective'),
	`effectiveness_note` text,
	`cancel_reason` text,
	`owner_id` int NOT NULL,
	`created_by` int NOT NULL,
	`due_at` datetime(3),
	`effectiveness_due_at` datetime(3),
	`closed_at` datetime(3),
	`created_at` datetime(3) NOT NULL,
	`updated_at` datetime(3) NOT NULL,
	CONSTRAINT `capas_id` PRIMARY KEY(`id`),
	CONSTRAINT `capas_number_uq` UNIQUE(`number`)
);
--> statement-breakpoint
CREATE TABLE `complaints` (
	`id` int AUTO_INCREMENT NOT NULL,
	`number` varchar(20) NOT NULL,
	`status` enum('received','assessment','investigation','response','closed') NOT NULL DEFAULT 'received',
	`version` int NOT NULL DEFAULT 1,
	`received_on` date NOT NULL,
	`channel` varchar(32) NOT NULL,
	`complainant_name` varchar(160),
	`complainant_contact` varchar(255),
	`complainant_kind` varchar(32) NOT NULL,
	`product_id` int,
	`batch_id` int,
	`lot_as_reported` varchar(60),
	`lot_unknown` boolean NOT NULL DEFAULT false,
	`description` text NOT NULL,
	`units_affected` int,
	`person_harmed` boolean NOT NULL DEFAULT false,
	`harm_description` text,
	`samples_returning` boolean NOT NULL DEFAULT false,
	`category` varchar(48),
	`adverse_event` boolean,
	`serious_adverse_event` boolean,
	`reportable` boolean,
	`report_kind` varchar(48),
	`report_due_on` date,
	`report_submitted_at` datetime(3),
	`assessment_rationale` text,
	`investigation_summary` text,
	`response_text` text,
	`response_sent_at` datetime(3),
	`owner_id` int,
	`created_by` int NOT NULL,
	`due_at` datetime(3),
	`closed_at` datetime(3),
	`created_at` datetime(3) NOT NULL,
	`updated_at` datetime(3) NOT NULL,
	CONSTRAINT `complaints_id` PRIMARY KEY(`id`),
	CONSTRAINT `complaints_number_uq` UNIQUE(`number`)
);
--> statement-breakpoint
ALTER TABLE `batches` ADD CONSTRAINT `batches_product_id_products_id_fk` FOREIGN KEY (`product_id`) REFERENCES `products`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `batches` ADD CONSTRAINT `batches_machine_id_machines_id_fk` FOREIGN KEY (`machine_id`) REFERENCES `machines`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `batches` ADD CONSTRAINT `batches_ring_id_filling_rings_id_fk` FOREIGN KEY (`ring_id`) REFERENCES `filling_rings`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `filling_rings` ADD CONSTRAINT `filling_rings_machine_id_machines_id_fk` FOREIGN KEY (`machine_id`) REFERENCES `machines`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `attachments` ADD CONSTRAINT `attachments_uploaded_by_users_id_fk` FOREIGN KEY (`uploaded_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `comments` ADD CONSTRAINT `comments_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `record_links` ADD CONSTRAINT `record_links_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `signatures` ADD CONSTRAINT `signatures_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `state_history` ADD CONSTRAINT `state_history_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `action_tokens` ADD CONSTRAINT `action_tokens_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `mail_attempts` ADD CONSTRAINT `mail_attempts_outbox_id_mail_outbox_id_fk` FOREIGN KEY (`outbox_id`) REFERENCES `mail_outbox`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `mail_outbox` ADD CONSTRAINT `mail_outbox_to_user_id_users_id_fk` FOREIGN KEY (`to_user_id`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `deviation_batches` ADD CONSTRAINT `deviation_batches_deviation_id_deviations_id_fk` FOREIGN KEY (`deviation_id`) REFERENCES `deviations`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `deviation_batches` ADD CONSTRAINT `deviation_batches_batch_id_batches_id_fk` FOREIGN KEY (`batch_id`) REFERENCES `batches`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `deviations` ADD CONSTRAINT `deviations_defect_id_capsule_defects_id_fk` FOREIGN KEY (`defect_id`) REFERENCES `capsule_defects`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `deviations` ADD CONSTRAINT `deviations_product_id_products_id_fk` FOREIGN KEY (`product_id`) REFERENCES `products`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `deviations` ADD CONSTRAINT `deviations_batch_id_batches_id_fk` FOREIGN KEY (`batch_id`) REFERENCES `batches`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `deviations` ADD CONSTRAINT `deviations_machine_id_machines_id_fk` FOREIGN KEY (`machine_id`) REFERENCES `machines`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `deviations` ADD CONSTRAINT `deviations_ring_id_filling_rings_id_fk` FOREIGN KEY (`ring_id`) REFERENCES `filling_rings`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `deviations` ADD CONSTRAINT `deviations_raised_by_users_id_fk` FOREIGN KEY (`raised_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `deviations` ADD CONSTRAINT `deviations_owner_id_users_id_fk` FOREIGN KEY (`owner_id`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `deviations` ADD CONSTRAINT `deviations_investigator_id_users_id_fk` FOREIGN KEY (`investigator_id`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `capa_actions` ADD CONSTRAINT `capa_actions_capa_id_capas_id_fk` FOREIGN KEY (`capa_id`) REFERENCES `capas`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `capa_actions` ADD CONSTRAINT `capa_actions_owner_id_users_id_fk` FOREIGN KEY (`owner_id`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `capas` ADD CONSTRAINT `capas_owner_id_users_id_fk` FOREIGN KEY (`owner_id`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `capas` ADD CONSTRAINT `capas_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `complaints` ADD CONSTRAINT `complaints_product_id_products_id_fk` FOREIGN KEY (`product_id`) REFERENCES `products`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `complaints` ADD CONSTRAINT `complaints_batch_id_batches_id_fk` FOREIGN KEY (`batch_id`) REFERENCES `batches`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `complaints` ADD CONSTRAINT `complaints_owner_id_users_id_fk` FOREIGN KEY (`owner_id`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `complaints` ADD CONSTRAINT `complaints_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `users_role_active_idx` ON `users` (`role`,`active`);--> statement-breakpoint
CREATE INDEX `batches_product_idx` ON `batches` (`product_id`,`manufactured_on`);--> statement-breakpoint
CREATE INDEX `batches_machine_idx` ON `batches` (`machine_id`,`manufactured_on`);--> statement-breakpoint
CREATE INDEX `batches_ring_idx` ON `batches` (`ring_id`,`manufactured_on`);--> statement-breakpoint
CREATE INDEX `batches_status_idx` ON `batches` (`status`,`manufactured_on`);--> statement-breakpoint
CREATE INDEX `filling_rings_machine_idx` ON `filling_rings` (`machine_id`,`status`);--> statement-breakpoint
CREATE INDEX `attachments_record_idx` ON `attachments` (`record_type`,`record_id`);--> statement-breakpoint
CREATE INDEX `audit_entries_record_idx` ON `audit_entries` (`record_type`,`record_id`,`id`);--> statement-breakpoint
CREATE INDEX `audit_entries_user_idx` ON `audit_entries` (`user_id`,`id`);--> statement-breakpoint
CREATE INDEX `comments_record_idx` ON `comments` (`record_type`,`record_id`,`id`);--> statement-breakpoint
CREATE INDEX `record_links_to_idx` ON `record_links` (`to_type`,`to_id`);--> statement-breakpoint
CREATE INDEX `signatures_record_idx` ON `signatures` (`record_type`,`record_id`,`id`);--> statement-breakpoint
CREATE INDEX `state_history_record_idx` ON `state_history` (`record_type`,`record_id`,`id`);--> statement-breakpoint
CREATE INDEX `action_tokens_record_idx` ON `action_tokens` (`record_type`,`record_id`);--> statement-breakpoint
CREATE INDEX `mail_attempts_outbox_idx` ON `mail_attempts` (`outbox_id`);--> statement-breakpoint
CREATE INDEX `mail_outbox_due_idx` ON `mail_outbox` (`status`,`next_attempt_at`);--> statement-breakpoint
CREATE INDEX `deviation_batches_batch_idx` ON `deviation_batches` (`batch_id`);--> statement-breakpoint
CREATE INDEX `deviations_created_idx` ON `deviations` (`created_at`);--> statement-breakpoint
CREATE INDEX `deviations_status_idx` ON `deviations` (`status`,`created_at`);--> statement-breakpoint
CREATE INDEX `deviations_class_idx` ON `deviations` (`classification`,`created_at`);--> statement-breakpoint
CREATE INDEX `deviations_product_idx` ON `deviations` (`product_id`,`created_at`);--> statement-breakpoint
CREATE INDEX `deviations_batch_idx` ON `deviations` (`batch_id`,`created_at`);--> statement-breakpoint
CREATE INDEX `deviations_machine_idx` ON `deviations` (`machine_id`,`created_at`);--> statement-breakpoint
CREATE INDEX `deviations_ring_idx` ON `deviations` (`ring_id`,`created_at`);--> statement-breakpoint
CREATE INDEX `deviations_defect_idx` ON `deviations` (`defect_id`,`created_at`);--> statement-breakpoint
CREATE INDEX `deviations_owner_idx` ON `deviations` (`owner_id`,`status`);--> statement-breakpoint
CREATE INDEX `deviations_raised_by_idx` ON `deviations` (`raised_by`,`status`);--> statement-breakpoint
CREATE INDEX `deviations_due_idx` ON `deviations` (`status`,`due_at`);--> statement-breakpoint
CREATE INDEX `deviations_rpn_idx` ON `deviations` (`rpn`);--> statement-breakpoint
CREATE INDEX `capa_actions_capa_idx` ON `capa_actions` (`capa_id`);--> statement-breakpoint
CREATE INDEX `capa_actions_owner_idx` ON `capa_actions` (`owner_id`,`completed_at`);--> statement-breakpoint
CREATE INDEX `capas_created_idx` ON `capas` (`created_at`);--> statement-breakpoint
CREATE INDEX `capas_status_idx` ON `capas` (`status`,`created_at`);--> statement-breakpoint
CREATE INDEX `capas_owner_idx` ON `capas` (`owner_id`,`status`);--> statement-breakpoint
CREATE INDEX `capas_source_idx` ON `capas` (`source_type`,`source_id`);--> statement-breakpoint
CREATE INDEX `capas_due_idx` ON `capas` (`status`,`due_at`);--> statement-breakpoint
CREATE INDEX `complaints_received_idx` ON `complaints` (`received_on`);--> statement-breakpoint
CREATE INDEX `complaints_status_idx` ON `complaints` (`status`,`received_on`);--> statement-breakpoint
CREATE INDEX `complaints_product_idx` ON `complaints` (`product_id`,`received_on`);--> statement-breakpoint
CREATE INDEX `complaints_batch_idx` ON `complaints` (`batch_id`);--> statement-breakpoint
CREATE INDEX `complaints_category_idx` ON `complaints` (`category`,`received_on`);--> statement-breakpoint
CREATE INDEX `complaints_report_due_idx` ON `complaints` (`reportable`,`report_due_on`);--> statement-breakpoint
CREATE INDEX `complaints_owner_idx` ON `complaints` (`owner_id`,`status`);