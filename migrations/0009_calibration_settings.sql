CREATE TABLE `calibration_settings` (
	`site_id` integer PRIMARY KEY NOT NULL,
	`measurement_rel_sd` real NOT NULL,
	`updated_at` text NOT NULL,
	FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON UPDATE no action ON DELETE no action
);
