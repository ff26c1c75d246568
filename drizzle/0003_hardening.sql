CREATE TABLE `client_shows` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`studio_id` bigint unsigned NOT NULL,
	`user_id` varchar(40) NOT NULL,
	`show_id` bigint unsigned NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `client_shows_id` PRIMARY KEY(`id`),
	CONSTRAINT `client_shows_user_show_uq` UNIQUE(`user_id`,`show_id`)
);
--> statement-breakpoint
CREATE TABLE `throttle_hits` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`bucket` varchar(32) NOT NULL,
	`key_hash` varchar(64) NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `throttle_hits_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
ALTER TABLE `assets` ADD `sha256` varchar(64);--> statement-breakpoint
ALTER TABLE `invitations` ADD `show_ids` json;--> statement-breakpoint
ALTER TABLE `sessions` ADD `created_at` datetime DEFAULT CURRENT_TIMESTAMP NOT NULL;--> statement-breakpoint
ALTER TABLE `studios` ADD `bake_cost_limit` double;--> statement-breakpoint
ALTER TABLE `client_shows` ADD CONSTRAINT `client_shows_studio_id_studios_id_fk` FOREIGN KEY (`studio_id`) REFERENCES `studios`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `client_shows` ADD CONSTRAINT `client_shows_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `client_shows` ADD CONSTRAINT `client_shows_show_id_shows_id_fk` FOREIGN KEY (`show_id`) REFERENCES `shows`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `client_shows_studio_idx` ON `client_shows` (`studio_id`,`user_id`);--> statement-breakpoint
CREATE INDEX `throttle_hits_key_idx` ON `throttle_hits` (`bucket`,`key_hash`,`created_at`);--> statement-breakpoint
CREATE INDEX `throttle_hits_created_idx` ON `throttle_hits` (`created_at`);--> statement-breakpoint
INSERT INTO `client_shows` (`studio_id`, `user_id`, `show_id`) SELECT m.`studio_id`, m.`user_id`, s.`id` FROM `memberships` m JOIN `shows` s ON s.`studio_id` = m.`studio_id` WHERE m.`role` = 'client';