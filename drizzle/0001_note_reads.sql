CREATE TABLE `note_reads` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`studio_id` bigint unsigned NOT NULL,
	`user_id` varchar(40) NOT NULL,
	`version_id` bigint unsigned NOT NULL,
	`seen_at` datetime(3) NOT NULL,
	CONSTRAINT `note_reads_id` PRIMARY KEY(`id`),
	CONSTRAINT `note_reads_user_version_uq` UNIQUE(`user_id`,`version_id`)
);
--> statement-breakpoint
ALTER TABLE `note_reads` ADD CONSTRAINT `note_reads_studio_id_studios_id_fk` FOREIGN KEY (`studio_id`) REFERENCES `studios`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `note_reads` ADD CONSTRAINT `note_reads_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `note_reads` ADD CONSTRAINT `note_reads_version_id_versions_id_fk` FOREIGN KEY (`version_id`) REFERENCES `versions`(`id`) ON DELETE cascade ON UPDATE no action;