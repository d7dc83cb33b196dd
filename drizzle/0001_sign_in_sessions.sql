CREATE TABLE `sign_in_sessions` (
	`id` varchar(36) NOT NULL,
	`user_id` varchar(255) NOT NULL,
	`created_at` datetime(3) NOT NULL,
	`last_seen_at` datetime(3) NOT NULL,
	`revoked_at` datetime(3),
	CONSTRAINT `sign_in_sessions_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
ALTER TABLE `sign_in_sessions` ADD CONSTRAINT `sign_in_sessions_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `sign_in_sessions_user_idx` ON `sign_in_sessions` (`user_id`);