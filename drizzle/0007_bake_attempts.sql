CREATE TABLE `bake_attempts` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`job_id` bigint unsigned NOT NULL,
	`attempt` int NOT NULL,
	`worker_id` varchar(100) NOT NULL,
	`state` enum('running','done','lost','released','failed','cancelled') NOT NULL DEFAULT 'running',
	`clip_key` varchar(400) NOT NULL,
	`stats_key` varchar(400) NOT NULL,
	`objects_cleared` boolean NOT NULL DEFAULT false,
	`claimed_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`ended_at` datetime(3),
	CONSTRAINT `bake_attempts_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
ALTER TABLE `bake_attempts` ADD CONSTRAINT `bake_attempts_job_id_bake_jobs_id_fk` FOREIGN KEY (`job_id`) REFERENCES `bake_jobs`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `bake_attempts_job_idx` ON `bake_attempts` (`job_id`,`state`);