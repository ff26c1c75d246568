ALTER TABLE `shots` ADD `plate_first_frame` int;--> statement-breakpoint
ALTER TABLE `studios` ADD `handle_convention` enum('head-handle','cut-in') DEFAULT 'head-handle' NOT NULL;