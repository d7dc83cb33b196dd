CREATE TABLE `digest_sends` (
	`user_id` varchar(255) NOT NULL,
	`day` date NOT NULL,
	`mail_id` bigint,
	`created_at` datetime(3) NOT NULL,
	CONSTRAINT `digest_sends_user_id_day_pk` PRIMARY KEY(`user_id`,`day`)
);
--> statement-breakpoint
CREATE TABLE `feed_tokens` (
	`id` int AUTO_INCREMENT NOT NULL,
	`user_id` varchar(255) NOT NULL,
	`scope` enum('mine','plan') NOT NULL,
	`token` varchar(64) NOT NULL,
	`created_at` datetime(3) NOT NULL,
	`revoked_at` datetime(3),
	CONSTRAINT `feed_tokens_id` PRIMARY KEY(`id`),
	CONSTRAINT `feed_tokens_token_unique` UNIQUE(`token`)
);
--> statement-breakpoint
CREATE TABLE `job_leases` (
	`name` varchar(64) NOT NULL,
	`owner` varchar(128) NOT NULL,
	`expires_at` datetime(3) NOT NULL,
	CONSTRAINT `job_leases_name` PRIMARY KEY(`name`)
);
--> statement-breakpoint
CREATE TABLE `mail_outbox` (
	`id` bigint AUTO_INCREMENT NOT NULL,
	`kind` enum('work-order-assigned','work-order-rescheduled','work-order-cancelled','digest','other') NOT NULL,
	`status` enum('queued','sent') NOT NULL DEFAULT 'queued',
	`to_address` varchar(255) NOT NULL,
	`user_id` varchar(255),
	`work_order_id` int,
	`subject` varchar(255) NOT NULL,
	`text` mediumtext NOT NULL,
	`html` mediumtext,
	`ics_method` enum('REQUEST','CANCEL'),
	`ics` mediumtext,
	`headers` json,
	`dedupe_key` varchar(191),
	`attempts` int NOT NULL DEFAULT 0,
	`next_attempt_at` datetime(3) NOT NULL,
	`last_error` varchar(1000),
	`claim_token` char(36),
	`claimed_until` datetime(3),
	`created_at` datetime(3) NOT NULL,
	`sent_at` datetime(3),
	CONSTRAINT `mail_outbox_id` PRIMARY KEY(`id`),
	CONSTRAINT `mail_outbox_dedupe_key_unique` UNIQUE(`dedupe_key`)
);
--> statement-breakpoint
CREATE TABLE `mail_preferences` (
	`user_id` varchar(255) NOT NULL,
	`digest` boolean NOT NULL DEFAULT true,
	`notices` enum('mail','digest') NOT NULL DEFAULT 'mail',
	`unsubscribe_token` varchar(64) NOT NULL,
	`updated_at` datetime(3),
	CONSTRAINT `mail_preferences_user_id` PRIMARY KEY(`user_id`),
	CONSTRAINT `mail_preferences_unsubscribe_token_unique` UNIQUE(`unsubscribe_token`)
);
--> statement-breakpoint
CREATE TABLE `office_settings` (
	`id` tinyint NOT NULL,
	`capacity_per_day` int NOT NULL DEFAULT 4,
	`digest_time` char(5) NOT NULL DEFAULT '06:30',
	`time_zone` varchar(64),
	`updated_at` datetime(3),
	`updated_by` varchar(255),
	CONSTRAINT `office_settings_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `stock_movements` (
	`id` bigint AUTO_INCREMENT NOT NULL,
	`part_id` int NOT NULL,
	`at` datetime(3) NOT NULL,
	`user_id` varchar(255),
	`reason` enum('received','counted','adjusted','imported','reserved','released','consumed') NOT NULL,
	`on_hand_delta` int NOT NULL DEFAULT 0,
	`reserved_delta` int NOT NULL DEFAULT 0,
	`on_hand_after` int NOT NULL,
	`reserved_after` int NOT NULL,
	`work_order_id` int,
	`note` varchar(500),
	CONSTRAINT `stock_movements_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `stock_parts` (
	`id` int AUTO_INCREMENT NOT NULL,
	`part_number` varchar(40) NOT NULL,
	`description` varchar(200) NOT NULL,
	`kind` enum('ball','seat','vee-insert','flat','other') NOT NULL,
	`size` varchar(60),
	`material` varchar(60),
	`on_hand` int NOT NULL DEFAULT 0,
	`reserved` int NOT NULL DEFAULT 0,
	`reorder_level` int NOT NULL DEFAULT 0,
	`kept_at` varchar(120),
	`created_at` datetime(3) NOT NULL,
	`updated_at` datetime(3),
	`retired_at` datetime(3),
	CONSTRAINT `stock_parts_id` PRIMARY KEY(`id`),
	CONSTRAINT `stock_parts_number_idx` UNIQUE(`part_number`)
);
--> statement-breakpoint
CREATE TABLE `work_order_reservations` (
	`work_order_id` int NOT NULL,
	`stock_part_id` int NOT NULL,
	`quantity` int NOT NULL,
	CONSTRAINT `work_order_reservations_work_order_id_stock_part_id_pk` PRIMARY KEY(`work_order_id`,`stock_part_id`)
);
--> statement-breakpoint
ALTER TABLE `digest_sends` ADD CONSTRAINT `digest_sends_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `digest_sends` ADD CONSTRAINT `digest_sends_mail_id_mail_outbox_id_fk` FOREIGN KEY (`mail_id`) REFERENCES `mail_outbox`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `feed_tokens` ADD CONSTRAINT `feed_tokens_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `mail_outbox` ADD CONSTRAINT `mail_outbox_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `mail_outbox` ADD CONSTRAINT `mail_outbox_work_order_id_work_orders_id_fk` FOREIGN KEY (`work_order_id`) REFERENCES `work_orders`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `mail_preferences` ADD CONSTRAINT `mail_preferences_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `office_settings` ADD CONSTRAINT `office_settings_updated_by_users_id_fk` FOREIGN KEY (`updated_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `stock_movements` ADD CONSTRAINT `stock_movements_part_id_stock_parts_id_fk` FOREIGN KEY (`part_id`) REFERENCES `stock_parts`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `stock_movements` ADD CONSTRAINT `stock_movements_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `stock_movements` ADD CONSTRAINT `stock_movements_work_order_id_work_orders_id_fk` FOREIGN KEY (`work_order_id`) REFERENCES `work_orders`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `work_order_reservations` ADD CONSTRAINT `work_order_reservations_work_order_id_work_orders_id_fk` FOREIGN KEY (`work_order_id`) REFERENCES `work_orders`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `work_order_reservations` ADD CONSTRAINT `work_order_reservations_stock_part_id_stock_parts_id_fk` FOREIGN KEY (`stock_part_id`) REFERENCES `stock_parts`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `feed_tokens_user_idx` ON `feed_tokens` (`user_id`,`scope`,`revoked_at`);--> statement-breakpoint
CREATE INDEX `mail_outbox_due_idx` ON `mail_outbox` (`status`,`next_attempt_at`);--> statement-breakpoint
CREATE INDEX `mail_outbox_user_idx` ON `mail_outbox` (`user_id`,`created_at`);--> statement-breakpoint
CREATE INDEX `stock_movements_part_idx` ON `stock_movements` (`part_id`,`at`);--> statement-breakpoint
CREATE INDEX `work_order_reservations_part_idx` ON `work_order_reservations` (`stock_part_id`);--> statement-breakpoint
INSERT INTO `office_settings` (`id`) VALUES (1);
