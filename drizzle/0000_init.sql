CREATE TABLE `auth_accounts` (
	`user_id` varchar(255) NOT NULL,
	`type` varchar(255) NOT NULL,
	`provider` varchar(255) NOT NULL,
	`provider_account_id` varchar(255) NOT NULL,
	`refresh_token` varchar(255),
	`access_token` varchar(255),
	`expires_at` int,
	`token_type` varchar(255),
	`scope` varchar(255),
	`id_token` varchar(2048),
	`session_state` varchar(255),
	CONSTRAINT `auth_accounts_provider_provider_account_id_pk` PRIMARY KEY(`provider`,`provider_account_id`)
);
--> statement-breakpoint
CREATE TABLE `auth_sessions` (
	`session_token` varchar(255) NOT NULL,
	`user_id` varchar(255) NOT NULL,
	`expires` timestamp NOT NULL,
	CONSTRAINT `auth_sessions_session_token` PRIMARY KEY(`session_token`)
);
--> statement-breakpoint
CREATE TABLE `sign_in_throttle` (
	`throttle_key` varchar(320) NOT NULL,
	`failures` int NOT NULL DEFAULT 0,
	`window_started_at` datetime(3) NOT NULL,
	`locked_until` datetime(3),
	CONSTRAINT `sign_in_throttle_throttle_key` PRIMARY KEY(`throttle_key`)
);
--> statement-breakpoint
CREATE TABLE `user_roles` (
	`user_id` varchar(255) NOT NULL,
	`role` enum('operator','technician','supervisor','planner','admin') NOT NULL,
	`granted_at` datetime(3) NOT NULL,
	`granted_by` varchar(255),
	CONSTRAINT `user_roles_user_id_role_pk` PRIMARY KEY(`user_id`,`role`)
);
--> statement-breakpoint
CREATE TABLE `users` (
	`id` varchar(255) NOT NULL,
	`name` varchar(255),
	`email` varchar(255),
	`email_verified` timestamp(3),
	`image` varchar(255),
	`password_hash` varchar(255),
	`active` boolean NOT NULL DEFAULT true,
	`invited_at` datetime(3),
	`invited_by` varchar(255),
	`deactivated_at` datetime(3),
	`created_at` datetime(3) NOT NULL,
	CONSTRAINT `users_id` PRIMARY KEY(`id`),
	CONSTRAINT `users_email_unique` UNIQUE(`email`)
);
--> statement-breakpoint
CREATE TABLE `auth_verification_tokens` (
	`identifier` varchar(255) NOT NULL,
	`token` varchar(255) NOT NULL,
	`expires` timestamp NOT NULL,
	CONSTRAINT `auth_verification_tokens_identifier_token_pk` PRIMARY KEY(`identifier`,`token`)
);
--> statement-breakpoint
CREATE TABLE `areas` (
	`id` int AUTO_INCREMENT NOT NULL,
	`site_id` int NOT NULL,
	`name` varchar(120) NOT NULL,
	`created_at` datetime(3) NOT NULL,
	CONSTRAINT `areas_id` PRIMARY KEY(`id`),
	CONSTRAINT `areas_site_name_uq` UNIQUE(`site_id`,`name`)
);
--> statement-breakpoint
CREATE TABLE `coupling_geometries` (
	`id` int AUTO_INCREMENT NOT NULL,
	`fixture_id` int NOT NULL,
	`version` int NOT NULL,
	`kind` varchar(32) NOT NULL,
	`params` json,
	`contacts` json NOT NULL,
	`ball_diameter_mm` double,
	`preload_n` double,
	`ball_material` json,
	`seat_material` json,
	`constraint_status` varchar(20),
	`created_at` datetime(3) NOT NULL,
	`created_by` varchar(255),
	CONSTRAINT `coupling_geometries_id` PRIMARY KEY(`id`),
	CONSTRAINT `coupling_geometries_fixture_version_uq` UNIQUE(`fixture_id`,`version`)
);
--> statement-breakpoint
CREATE TABLE `fixtures` (
	`id` int AUTO_INCREMENT NOT NULL,
	`code` varchar(16) NOT NULL,
	`name` varchar(160) NOT NULL,
	`type` enum('three-vee','trihedral-vee-flat','pallet','vise','plate','other') NOT NULL,
	`status` enum('in-service','breaking-in','on-hold','retired') NOT NULL DEFAULT 'in-service',
	`location_id` int NOT NULL,
	`policy_id` int,
	`policy_overrides` json,
	`repeatability_spec_um` double,
	`rated_life_cycles` int,
	`ball_material` varchar(80),
	`seat_material` varchar(80),
	`ball_diameter_mm` double,
	`preload_n` double,
	`mass_kg` double,
	`commissioned_on` date,
	`notes` text,
	`created_at` datetime(3) NOT NULL,
	`created_by` varchar(255),
	`updated_at` datetime(3) NOT NULL,
	CONSTRAINT `fixtures_id` PRIMARY KEY(`id`),
	CONSTRAINT `fixtures_code_unique` UNIQUE(`code`)
);
--> statement-breakpoint
CREATE TABLE `locations` (
	`id` int AUTO_INCREMENT NOT NULL,
	`area_id` int NOT NULL,
	`name` varchar(120) NOT NULL,
	`created_at` datetime(3) NOT NULL,
	CONSTRAINT `locations_id` PRIMARY KEY(`id`),
	CONSTRAINT `locations_area_name_uq` UNIQUE(`area_id`,`name`)
);
--> statement-breakpoint
CREATE TABLE `policies` (
	`id` int AUTO_INCREMENT NOT NULL,
	`name` varchar(120) NOT NULL,
	`fixture_type` enum('three-vee','trihedral-vee-flat','pallet','vise','plate','other'),
	`repeatability_spec_um` double NOT NULL,
	`repeatability_window` int NOT NULL,
	`break_in_min_cycles` int NOT NULL,
	`settle_window` int NOT NULL,
	`settle_tolerance_um` double NOT NULL,
	`cleaning_interval_cycles` int,
	`cleaning_interval_days` int,
	`inspection_interval_cycles` int,
	`inspection_interval_days` int,
	`rated_life_cycles` int,
	`wear_limit_grade` int NOT NULL,
	`forecast_horizon_cycles` int NOT NULL,
	`notes` text,
	`updated_at` datetime(3) NOT NULL,
	`updated_by` varchar(255),
	CONSTRAINT `policies_id` PRIMARY KEY(`id`),
	CONSTRAINT `policies_name_unique` UNIQUE(`name`),
	CONSTRAINT `policies_fixture_type_unique` UNIQUE(`fixture_type`)
);
--> statement-breakpoint
CREATE TABLE `sites` (
	`id` int AUTO_INCREMENT NOT NULL,
	`name` varchar(120) NOT NULL,
	`timezone` varchar(64) NOT NULL DEFAULT 'UTC',
	`created_at` datetime(3) NOT NULL,
	CONSTRAINT `sites_id` PRIMARY KEY(`id`),
	CONSTRAINT `sites_name_unique` UNIQUE(`name`)
);
--> statement-breakpoint
CREATE TABLE `attachments` (
	`id` char(36) NOT NULL,
	`fixture_id` int NOT NULL,
	`event_id` char(36),
	`object_key` varchar(255) NOT NULL,
	`content_type` varchar(64) NOT NULL,
	`size_bytes` int NOT NULL,
	`sha256` char(64) NOT NULL,
	`width` int,
	`height` int,
	`uploaded_by` varchar(255) NOT NULL,
	`created_at` datetime(3) NOT NULL,
	CONSTRAINT `attachments_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `events` (
	`id` char(36) NOT NULL,
	`fixture_id` int NOT NULL,
	`kind` varchar(20) NOT NULL,
	`occurred_at` datetime(3) NOT NULL,
	`received_at` datetime(3) NOT NULL,
	`user_id` varchar(255) NOT NULL,
	`device_id` varchar(100) NOT NULL,
	`payload` json NOT NULL,
	`content_hash` char(64) NOT NULL,
	CONSTRAINT `events_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `fixture_state` (
	`fixture_id` int NOT NULL,
	`data` json NOT NULL,
	`event_count` int NOT NULL DEFAULT 0,
	`total_cycles` int NOT NULL DEFAULT 0,
	`cycles_since_cleaning` int NOT NULL DEFAULT 0,
	`cycles_since_inspection` int NOT NULL DEFAULT 0,
	`cycles_since_part_swap` int NOT NULL DEFAULT 0,
	`repeatability_um` double,
	`wear_grade` int,
	`last_event_at` datetime(3),
	`last_cleaning_at` datetime(3),
	`last_inspection_at` datetime(3),
	`updated_at` datetime(3) NOT NULL,
	CONSTRAINT `fixture_state_fixture_id` PRIMARY KEY(`fixture_id`)
);
--> statement-breakpoint
CREATE TABLE `flags` (
	`id` int AUTO_INCREMENT NOT NULL,
	`fixture_id` int NOT NULL,
	`kind` enum('break-in-due','cleaning-due','inspection-due','out-of-spec','drift','replace-soon','replace-now') NOT NULL,
	`reason` text NOT NULL,
	`figures` json,
	`raised_at` datetime(3) NOT NULL,
	`raised_by_event_id` char(36),
	`cleared_at` datetime(3),
	`cleared_by_event_id` char(36),
	CONSTRAINT `flags_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `work_orders` (
	`id` int AUTO_INCREMENT NOT NULL,
	`fixture_id` int NOT NULL,
	`action` enum('replace-balls','replace-seats','replace-fixture','re-break-in','inspect') NOT NULL,
	`status` enum('planned','scheduled','underway','done','cancelled') NOT NULL DEFAULT 'planned',
	`due_on` date NOT NULL,
	`assignee_id` varchar(255),
	`parts` json,
	`notes` text,
	`flag_id` int,
	`created_at` datetime(3) NOT NULL,
	`created_by` varchar(255),
	`updated_at` datetime(3) NOT NULL,
	`completed_at` datetime(3),
	CONSTRAINT `work_orders_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
ALTER TABLE `auth_accounts` ADD CONSTRAINT `auth_accounts_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `auth_sessions` ADD CONSTRAINT `auth_sessions_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `user_roles` ADD CONSTRAINT `user_roles_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `areas` ADD CONSTRAINT `areas_site_id_sites_id_fk` FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `coupling_geometries` ADD CONSTRAINT `coupling_geometries_fixture_id_fixtures_id_fk` FOREIGN KEY (`fixture_id`) REFERENCES `fixtures`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `coupling_geometries` ADD CONSTRAINT `coupling_geometries_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `fixtures` ADD CONSTRAINT `fixtures_location_id_locations_id_fk` FOREIGN KEY (`location_id`) REFERENCES `locations`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `fixtures` ADD CONSTRAINT `fixtures_policy_id_policies_id_fk` FOREIGN KEY (`policy_id`) REFERENCES `policies`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `fixtures` ADD CONSTRAINT `fixtures_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `locations` ADD CONSTRAINT `locations_area_id_areas_id_fk` FOREIGN KEY (`area_id`) REFERENCES `areas`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `policies` ADD CONSTRAINT `policies_updated_by_users_id_fk` FOREIGN KEY (`updated_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `attachments` ADD CONSTRAINT `attachments_fixture_id_fixtures_id_fk` FOREIGN KEY (`fixture_id`) REFERENCES `fixtures`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `attachments` ADD CONSTRAINT `attachments_uploaded_by_users_id_fk` FOREIGN KEY (`uploaded_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `events` ADD CONSTRAINT `events_fixture_id_fixtures_id_fk` FOREIGN KEY (`fixture_id`) REFERENCES `fixtures`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `events` ADD CONSTRAINT `events_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `fixture_state` ADD CONSTRAINT `fixture_state_fixture_id_fixtures_id_fk` FOREIGN KEY (`fixture_id`) REFERENCES `fixtures`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `flags` ADD CONSTRAINT `flags_fixture_id_fixtures_id_fk` FOREIGN KEY (`fixture_id`) REFERENCES `fixtures`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `work_orders` ADD CONSTRAINT `work_orders_fixture_id_fixtures_id_fk` FOREIGN KEY (`fixture_id`) REFERENCES `fixtures`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `work_orders` ADD CONSTRAINT `work_orders_assignee_id_users_id_fk` FOREIGN KEY (`assignee_id`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `work_orders` ADD CONSTRAINT `work_orders_flag_id_flags_id_fk` FOREIGN KEY (`flag_id`) REFERENCES `flags`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `work_orders` ADD CONSTRAINT `work_orders_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `sign_in_throttle_locked_idx` ON `sign_in_throttle` (`locked_until`);--> statement-breakpoint
CREATE INDEX `fixtures_location_idx` ON `fixtures` (`location_id`);--> statement-breakpoint
CREATE INDEX `fixtures_status_idx` ON `fixtures` (`status`);--> statement-breakpoint
CREATE INDEX `fixtures_type_idx` ON `fixtures` (`type`);--> statement-breakpoint
CREATE INDEX `fixtures_name_idx` ON `fixtures` (`name`);--> statement-breakpoint
CREATE INDEX `attachments_event_idx` ON `attachments` (`event_id`);--> statement-breakpoint
CREATE INDEX `attachments_fixture_idx` ON `attachments` (`fixture_id`);--> statement-breakpoint
CREATE INDEX `events_fixture_occurred_idx` ON `events` (`fixture_id`,`occurred_at`);--> statement-breakpoint
CREATE INDEX `events_fixture_received_idx` ON `events` (`fixture_id`,`received_at`);--> statement-breakpoint
CREATE INDEX `events_user_idx` ON `events` (`user_id`,`received_at`);--> statement-breakpoint
CREATE INDEX `fixture_state_cycles_idx` ON `fixture_state` (`total_cycles`);--> statement-breakpoint
CREATE INDEX `flags_fixture_open_idx` ON `flags` (`fixture_id`,`cleared_at`);--> statement-breakpoint
CREATE INDEX `flags_kind_open_idx` ON `flags` (`kind`,`cleared_at`);--> statement-breakpoint
CREATE INDEX `work_orders_fixture_idx` ON `work_orders` (`fixture_id`);--> statement-breakpoint
CREATE INDEX `work_orders_due_idx` ON `work_orders` (`status`,`due_on`);--> statement-breakpoint
CREATE INDEX `work_orders_assignee_idx` ON `work_orders` (`assignee_id`);