CREATE TABLE `inbox_marks` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`studio_id` bigint unsigned NOT NULL,
	`user_id` varchar(40) NOT NULL,
	`item_type` enum('shot','version','note') NOT NULL,
	`item_id` bigint unsigned NOT NULL,
	`read_at` datetime(3),
	`dismissed_at` datetime(3),
	CONSTRAINT `inbox_marks_id` PRIMARY KEY(`id`),
	CONSTRAINT `inbox_marks_user_item_uq` UNIQUE(`user_id`,`item_type`,`item_id`)
);
--> statement-breakpoint
ALTER TABLE `inbox_marks` ADD CONSTRAINT `inbox_marks_studio_id_studios_id_fk` FOREIGN KEY (`studio_id`) REFERENCES `studios`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `inbox_marks` ADD CONSTRAINT `inbox_marks_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `inbox_marks_studio_idx` ON `inbox_marks` (`studio_id`);