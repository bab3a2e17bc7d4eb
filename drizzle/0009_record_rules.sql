ALTER TABLE `deviations` MODIFY COLUMN `status` enum('draft','reported','triage','investigation','approval','closed','cancelled','discarded') NOT NULL DEFAULT 'draft';--> statement-breakpoint
ALTER TABLE `signatures` ADD `content_parts` text;--> statement-breakpoint
-- The audit chain's head row, so no append ever has to create it (an INSERT IGNORE per append takes a shared lock first and deadlocks concurrent writers).
INSERT IGNORE INTO `audit_chain_head` (`id`, `last_entry_id`, `last_hash`) VALUES (1, 0, '0000000000000000000000000000000000000000000000000000000000000000');