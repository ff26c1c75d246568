CREATE TABLE `assets` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`studio_id` bigint unsigned NOT NULL,
	`kind` enum('plate','thumbnail','clip','stats','export') NOT NULL,
	`storage_key` varchar(400) NOT NULL,
	`content_type` varchar(100) NOT NULL,
	`byte_size` bigint unsigned NOT NULL DEFAULT 0,
	`width` int,
	`height` int,
	`version_id` bigint unsigned,
	`shot_id` bigint unsigned,
	`format` varchar(16),
	`meta` json,
	`created_by` varchar(40),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `assets_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `audit_log` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`studio_id` bigint unsigned,
	`actor_id` varchar(40),
	`action` varchar(64) NOT NULL,
	`target_type` varchar(32),
	`target_id` varchar(64),
	`detail` json,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `audit_log_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `bake_jobs` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`studio_id` bigint unsigned NOT NULL,
	`version_id` bigint unsigned NOT NULL,
	`scene_hash` varchar(64) NOT NULL,
	`state` enum('queued','running','done','failed','cancelled') NOT NULL DEFAULT 'queued',
	`attempts` int NOT NULL DEFAULT 0,
	`max_attempts` int NOT NULL DEFAULT 3,
	`lease_owner` varchar(100),
	`lease_expires_at` datetime(3),
	`cancel_requested` boolean NOT NULL DEFAULT false,
	`frames_done` int NOT NULL DEFAULT 0,
	`frames_total` int NOT NULL DEFAULT 0,
	`error` text,
	`requested_by` varchar(40),
	`started_at` datetime(3),
	`finished_at` datetime(3),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `bake_jobs_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `invitations` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`studio_id` bigint unsigned NOT NULL,
	`email` varchar(254) NOT NULL,
	`role` enum('owner','supervisor','artist','client') NOT NULL,
	`token_hash` varchar(64) NOT NULL,
	`invited_by` varchar(40),
	`expires_at` datetime NOT NULL,
	`accepted_at` datetime,
	`revoked_at` datetime,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `invitations_id` PRIMARY KEY(`id`),
	CONSTRAINT `invitations_token_hash_unique` UNIQUE(`token_hash`)
);
--> statement-breakpoint
CREATE TABLE `memberships` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`studio_id` bigint unsigned NOT NULL,
	`user_id` varchar(40) NOT NULL,
	`role` enum('owner','supervisor','artist','client') NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `memberships_id` PRIMARY KEY(`id`),
	CONSTRAINT `memberships_studio_user_uq` UNIQUE(`studio_id`,`user_id`)
);
--> statement-breakpoint
CREATE TABLE `notes` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`studio_id` bigint unsigned NOT NULL,
	`version_id` bigint unsigned NOT NULL,
	`parent_id` bigint unsigned,
	`author_id` varchar(40),
	`guest_name` varchar(120),
	`frame` int NOT NULL,
	`point_x` double,
	`point_y` double,
	`stroke` json,
	`body` text NOT NULL,
	`internal` boolean NOT NULL DEFAULT true,
	`resolved_at` datetime,
	`resolved_by` varchar(40),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `notes_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `password_resets` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`user_id` varchar(40) NOT NULL,
	`token_hash` varchar(64) NOT NULL,
	`expires_at` datetime NOT NULL,
	`used_at` datetime,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `password_resets_id` PRIMARY KEY(`id`),
	CONSTRAINT `password_resets_token_hash_unique` UNIQUE(`token_hash`)
);
--> statement-breakpoint
CREATE TABLE `review_events` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`studio_id` bigint unsigned NOT NULL,
	`version_id` bigint unsigned NOT NULL,
	`actor_id` varchar(40),
	`from_state` enum('draft','submitted','approved','returned','superseded') NOT NULL,
	`to_state` enum('draft','submitted','approved','returned','superseded') NOT NULL,
	`comment` text,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `review_events_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `sessions` (
	`id` varchar(255) NOT NULL,
	`user_id` varchar(40) NOT NULL,
	`expires_at` datetime NOT NULL,
	CONSTRAINT `sessions_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `share_links` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`studio_id` bigint unsigned NOT NULL,
	`version_id` bigint unsigned NOT NULL,
	`export_asset_id` bigint unsigned,
	`token_hash` varchar(64) NOT NULL,
	`password_hash` varchar(255),
	`expires_at` datetime NOT NULL,
	`revoked_at` datetime,
	`open_count` int NOT NULL DEFAULT 0,
	`created_by` varchar(40),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `share_links_id` PRIMARY KEY(`id`),
	CONSTRAINT `share_links_token_hash_unique` UNIQUE(`token_hash`)
);
--> statement-breakpoint
CREATE TABLE `shots` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`studio_id` bigint unsigned NOT NULL,
	`show_id` bigint unsigned NOT NULL,
	`code` varchar(64) NOT NULL,
	`description` text,
	`first_frame` int NOT NULL DEFAULT 1001,
	`last_frame` int NOT NULL,
	`handles` int NOT NULL DEFAULT 8,
	`frame_rate` varchar(12) NOT NULL DEFAULT '24',
	`plate_width` int NOT NULL DEFAULT 1920,
	`plate_height` int NOT NULL DEFAULT 1080,
	`pixel_aspect` double NOT NULL DEFAULT 1,
	`assignee_id` varchar(40),
	`due_date` date,
	`status` enum('blocking','in review','approved','on hold','omitted') NOT NULL DEFAULT 'blocking',
	`plate_asset_id` bigint unsigned,
	`thumbnail_asset_id` bigint unsigned,
	`metres_per_pixel` double,
	`archived_at` datetime,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `shots_id` PRIMARY KEY(`id`),
	CONSTRAINT `shots_show_code_uq` UNIQUE(`show_id`,`code`)
);
--> statement-breakpoint
CREATE TABLE `shows` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`studio_id` bigint unsigned NOT NULL,
	`code` varchar(32) NOT NULL,
	`name` varchar(120) NOT NULL,
	`description` text,
	`frame_rate` varchar(12) NOT NULL DEFAULT '24',
	`archived_at` datetime,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `shows_id` PRIMARY KEY(`id`),
	CONSTRAINT `shows_studio_code_uq` UNIQUE(`studio_id`,`code`)
);
--> statement-breakpoint
CREATE TABLE `sign_in_attempts` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`email` varchar(254) NOT NULL,
	`ip` varchar(64) NOT NULL,
	`succeeded` boolean NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `sign_in_attempts_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `studios` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`slug` varchar(64) NOT NULL,
	`name` varchar(120) NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `studios_id` PRIMARY KEY(`id`),
	CONSTRAINT `studios_slug_unique` UNIQUE(`slug`)
);
--> statement-breakpoint
CREATE TABLE `users` (
	`id` varchar(40) NOT NULL,
	`email` varchar(254) NOT NULL,
	`name` varchar(120) NOT NULL,
	`password_hash` varchar(255) NOT NULL,
	`daily_digest` boolean NOT NULL DEFAULT false,
	`last_active_at` datetime,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `users_id` PRIMARY KEY(`id`),
	CONSTRAINT `users_email_unique` UNIQUE(`email`)
);
--> statement-breakpoint
CREATE TABLE `versions` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`studio_id` bigint unsigned NOT NULL,
	`shot_id` bigint unsigned NOT NULL,
	`number` int NOT NULL,
	`author_id` varchar(40),
	`comment` text,
	`scene` json NOT NULL,
	`scene_hash` varchar(64) NOT NULL,
	`plate_asset_id` bigint unsigned,
	`review_state` enum('draft','submitted','approved','returned','superseded') NOT NULL DEFAULT 'draft',
	`bake_state` enum('none','queued','baking','baked','failed','cancelled') NOT NULL DEFAULT 'none',
	`clip_asset_id` bigint unsigned,
	`shared_with_client` boolean NOT NULL DEFAULT false,
	`frozen_at` datetime,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `versions_id` PRIMARY KEY(`id`),
	CONSTRAINT `versions_shot_number_uq` UNIQUE(`shot_id`,`number`)
);
--> statement-breakpoint
ALTER TABLE `assets` ADD CONSTRAINT `assets_studio_id_studios_id_fk` FOREIGN KEY (`studio_id`) REFERENCES `studios`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `assets` ADD CONSTRAINT `assets_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `audit_log` ADD CONSTRAINT `audit_log_studio_id_studios_id_fk` FOREIGN KEY (`studio_id`) REFERENCES `studios`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `audit_log` ADD CONSTRAINT `audit_log_actor_id_users_id_fk` FOREIGN KEY (`actor_id`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `bake_jobs` ADD CONSTRAINT `bake_jobs_studio_id_studios_id_fk` FOREIGN KEY (`studio_id`) REFERENCES `studios`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `bake_jobs` ADD CONSTRAINT `bake_jobs_version_id_versions_id_fk` FOREIGN KEY (`version_id`) REFERENCES `versions`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `bake_jobs` ADD CONSTRAINT `bake_jobs_requested_by_users_id_fk` FOREIGN KEY (`requested_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `invitations` ADD CONSTRAINT `invitations_studio_id_studios_id_fk` FOREIGN KEY (`studio_id`) REFERENCES `studios`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `invitations` ADD CONSTRAINT `invitations_invited_by_users_id_fk` FOREIGN KEY (`invited_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `memberships` ADD CONSTRAINT `memberships_studio_id_studios_id_fk` FOREIGN KEY (`studio_id`) REFERENCES `studios`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `memberships` ADD CONSTRAINT `memberships_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `notes` ADD CONSTRAINT `notes_studio_id_studios_id_fk` FOREIGN KEY (`studio_id`) REFERENCES `studios`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `notes` ADD CONSTRAINT `notes_version_id_versions_id_fk` FOREIGN KEY (`version_id`) REFERENCES `versions`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `notes` ADD CONSTRAINT `notes_author_id_users_id_fk` FOREIGN KEY (`author_id`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `notes` ADD CONSTRAINT `notes_resolved_by_users_id_fk` FOREIGN KEY (`resolved_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `password_resets` ADD CONSTRAINT `password_resets_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `review_events` ADD CONSTRAINT `review_events_studio_id_studios_id_fk` FOREIGN KEY (`studio_id`) REFERENCES `studios`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `review_events` ADD CONSTRAINT `review_events_version_id_versions_id_fk` FOREIGN KEY (`version_id`) REFERENCES `versions`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `review_events` ADD CONSTRAINT `review_events_actor_id_users_id_fk` FOREIGN KEY (`actor_id`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `sessions` ADD CONSTRAINT `sessions_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `share_links` ADD CONSTRAINT `share_links_studio_id_studios_id_fk` FOREIGN KEY (`studio_id`) REFERENCES `studios`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `share_links` ADD CONSTRAINT `share_links_version_id_versions_id_fk` FOREIGN KEY (`version_id`) REFERENCES `versions`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `share_links` ADD CONSTRAINT `share_links_export_asset_id_assets_id_fk` FOREIGN KEY (`export_asset_id`) REFERENCES `assets`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `share_links` ADD CONSTRAINT `share_links_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `shots` ADD CONSTRAINT `shots_studio_id_studios_id_fk` FOREIGN KEY (`studio_id`) REFERENCES `studios`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `shots` ADD CONSTRAINT `shots_show_id_shows_id_fk` FOREIGN KEY (`show_id`) REFERENCES `shows`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `shots` ADD CONSTRAINT `shots_assignee_id_users_id_fk` FOREIGN KEY (`assignee_id`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `shots` ADD CONSTRAINT `shots_plate_asset_id_assets_id_fk` FOREIGN KEY (`plate_asset_id`) REFERENCES `assets`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `shots` ADD CONSTRAINT `shots_thumbnail_asset_id_assets_id_fk` FOREIGN KEY (`thumbnail_asset_id`) REFERENCES `assets`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `shows` ADD CONSTRAINT `shows_studio_id_studios_id_fk` FOREIGN KEY (`studio_id`) REFERENCES `studios`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `versions` ADD CONSTRAINT `versions_studio_id_studios_id_fk` FOREIGN KEY (`studio_id`) REFERENCES `studios`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `versions` ADD CONSTRAINT `versions_shot_id_shots_id_fk` FOREIGN KEY (`shot_id`) REFERENCES `shots`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `versions` ADD CONSTRAINT `versions_author_id_users_id_fk` FOREIGN KEY (`author_id`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `versions` ADD CONSTRAINT `versions_plate_asset_id_assets_id_fk` FOREIGN KEY (`plate_asset_id`) REFERENCES `assets`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `versions` ADD CONSTRAINT `versions_clip_asset_id_assets_id_fk` FOREIGN KEY (`clip_asset_id`) REFERENCES `assets`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `assets_studio_kind_idx` ON `assets` (`studio_id`,`kind`);--> statement-breakpoint
CREATE INDEX `assets_version_idx` ON `assets` (`version_id`);--> statement-breakpoint
CREATE INDEX `assets_shot_idx` ON `assets` (`shot_id`);--> statement-breakpoint
CREATE INDEX `audit_log_studio_idx` ON `audit_log` (`studio_id`,`created_at`);--> statement-breakpoint
CREATE INDEX `bake_jobs_state_idx` ON `bake_jobs` (`state`,`lease_expires_at`);--> statement-breakpoint
CREATE INDEX `bake_jobs_version_idx` ON `bake_jobs` (`version_id`);--> statement-breakpoint
CREATE INDEX `invitations_studio_idx` ON `invitations` (`studio_id`,`created_at`);--> statement-breakpoint
CREATE INDEX `memberships_user_idx` ON `memberships` (`user_id`);--> statement-breakpoint
CREATE INDEX `notes_version_frame_idx` ON `notes` (`version_id`,`frame`);--> statement-breakpoint
CREATE INDEX `review_events_version_idx` ON `review_events` (`version_id`,`created_at`);--> statement-breakpoint
CREATE INDEX `sessions_user_idx` ON `sessions` (`user_id`);--> statement-breakpoint
CREATE INDEX `share_links_version_idx` ON `share_links` (`version_id`);--> statement-breakpoint
CREATE INDEX `shots_studio_status_idx` ON `shots` (`studio_id`,`status`);--> statement-breakpoint
CREATE INDEX `shots_assignee_idx` ON `shots` (`assignee_id`);--> statement-breakpoint
CREATE INDEX `shows_studio_updated_idx` ON `shows` (`studio_id`,`updated_at`);--> statement-breakpoint
CREATE INDEX `sign_in_attempts_email_idx` ON `sign_in_attempts` (`email`,`created_at`);--> statement-breakpoint
CREATE INDEX `sign_in_attempts_ip_idx` ON `sign_in_attempts` (`ip`,`created_at`);--> statement-breakpoint
CREATE INDEX `versions_studio_review_idx` ON `versions` (`studio_id`,`review_state`);--> statement-breakpoint
CREATE INDEX `versions_scene_hash_idx` ON `versions` (`scene_hash`);