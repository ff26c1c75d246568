ALTER TABLE `versions` ADD `client_state` enum('not sent','waiting','signed off','changes asked') DEFAULT 'not sent' NOT NULL;--> statement-breakpoint
ALTER TABLE `versions` ADD `client_sent_at` datetime;--> statement-breakpoint
ALTER TABLE `versions` ADD `client_decided_at` datetime;--> statement-breakpoint
ALTER TABLE `versions` ADD `client_decided_by` varchar(40);--> statement-breakpoint
ALTER TABLE `versions` ADD `client_decider_name` varchar(120);--> statement-breakpoint
ALTER TABLE `versions` ADD `client_comment` text;--> statement-breakpoint
ALTER TABLE `versions` ADD CONSTRAINT `versions_client_decided_by_users_id_fk` FOREIGN KEY (`client_decided_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `versions_studio_client_idx` ON `versions` (`studio_id`,`client_state`);