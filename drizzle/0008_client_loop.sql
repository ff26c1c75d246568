CREATE TABLE `share_link_recipients` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`studio_id` bigint unsigned NOT NULL,
	`share_link_id` bigint unsigned NOT NULL,
	`email` varchar(254) NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `share_link_recipients_id` PRIMARY KEY(`id`),
	CONSTRAINT `share_link_recipients_link_email_uq` UNIQUE(`share_link_id`,`email`)
);
--> statement-breakpoint
ALTER TABLE `notes` ADD `client_source` enum('share link','client account');--> statement-breakpoint
ALTER TABLE `notes` ADD `mailed_at` datetime(3);--> statement-breakpoint
ALTER TABLE `versions` ADD `client_notes_mailed_at` datetime(3);--> statement-breakpoint
ALTER TABLE `share_link_recipients` ADD CONSTRAINT `share_link_recipients_studio_id_studios_id_fk` FOREIGN KEY (`studio_id`) REFERENCES `studios`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `share_link_recipients` ADD CONSTRAINT `share_link_recipients_share_link_id_share_links_id_fk` FOREIGN KEY (`share_link_id`) REFERENCES `share_links`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `share_link_recipients_email_idx` ON `share_link_recipients` (`studio_id`,`email`);--> statement-breakpoint
CREATE INDEX `notes_client_outbox_idx` ON `notes` (`client_source`,`mailed_at`);