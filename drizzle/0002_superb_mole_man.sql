ALTER TABLE `shots` ADD `source_timecode_in` varchar(11);--> statement-breakpoint
ALTER TABLE `shots` ADD `record_in` varchar(11);--> statement-breakpoint
ALTER TABLE `shots` ADD `record_out` varchar(11);--> statement-breakpoint
ALTER TABLE `shots` ADD `reel` varchar(64);--> statement-breakpoint
ALTER TABLE `shots` ADD `clip_name` varchar(255);