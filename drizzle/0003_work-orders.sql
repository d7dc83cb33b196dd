CREATE TABLE `work_order_flags` (
	`work_order_id` int NOT NULL,
	`flag_id` int NOT NULL,
	CONSTRAINT `work_order_flags_work_order_id_flag_id_pk` PRIMARY KEY(`work_order_id`,`flag_id`)
);
--> statement-breakpoint
CREATE TABLE `work_order_history` (
	`id` bigint AUTO_INCREMENT NOT NULL,
	`work_order_id` int NOT NULL,
	`at` datetime(3) NOT NULL,
	`user_id` varchar(255),
	`what` varchar(32) NOT NULL,
	`changes` json NOT NULL,
	`event_id` char(36),
	CONSTRAINT `work_order_history_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
ALTER TABLE `work_orders` DROP FOREIGN KEY `work_orders_flag_id_flags_id_fk`;
--> statement-breakpoint
ALTER TABLE `work_orders` MODIFY COLUMN `action` enum('replace-balls','replace-seats','replace-fixture','re-break-in','inspect','clean','other') NOT NULL;--> statement-breakpoint
ALTER TABLE `work_orders` MODIFY COLUMN `due_on` date;--> statement-breakpoint
ALTER TABLE `work_orders` MODIFY COLUMN `parts` json NOT NULL;--> statement-breakpoint
ALTER TABLE `policies` ADD `planning_horizon_days` int DEFAULT 14 NOT NULL;--> statement-breakpoint
ALTER TABLE `work_orders` ADD `action_text` varchar(200);--> statement-breakpoint
ALTER TABLE `work_orders` ADD `cancel_reason` text;--> statement-breakpoint
ALTER TABLE `work_orders` ADD `started_at` datetime(3);--> statement-breakpoint
ALTER TABLE `work_orders` ADD `completed_by` varchar(255);--> statement-breakpoint
ALTER TABLE `work_orders` ADD `completed_by_event_id` char(36);--> statement-breakpoint
ALTER TABLE `work_order_flags` ADD CONSTRAINT `work_order_flags_work_order_id_work_orders_id_fk` FOREIGN KEY (`work_order_id`) REFERENCES `work_orders`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `work_order_flags` ADD CONSTRAINT `work_order_flags_flag_id_flags_id_fk` FOREIGN KEY (`flag_id`) REFERENCES `flags`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `work_order_history` ADD CONSTRAINT `work_order_history_work_order_id_work_orders_id_fk` FOREIGN KEY (`work_order_id`) REFERENCES `work_orders`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `work_order_history` ADD CONSTRAINT `work_order_history_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `work_order_flags_flag_idx` ON `work_order_flags` (`flag_id`);--> statement-breakpoint
CREATE INDEX `work_order_history_order_idx` ON `work_order_history` (`work_order_id`,`at`);--> statement-breakpoint
ALTER TABLE `work_orders` ADD CONSTRAINT `work_orders_completed_by_users_id_fk` FOREIGN KEY (`completed_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `work_orders_fixture_status_idx` ON `work_orders` (`fixture_id`,`status`);--> statement-breakpoint
CREATE INDEX `work_orders_assignee_due_idx` ON `work_orders` (`assignee_id`,`status`,`due_on`);--> statement-breakpoint
-- The old indexes go after their replacements exist: MariaDB refuses to drop the index a
-- foreign key (fixture_id, assignee_id) relies on while it is the only one.
DROP INDEX `work_orders_fixture_idx` ON `work_orders`;--> statement-breakpoint
DROP INDEX `work_orders_assignee_idx` ON `work_orders`;--> statement-breakpoint
ALTER TABLE `work_orders` DROP COLUMN `flag_id`;