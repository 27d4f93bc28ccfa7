CREATE TABLE `assay_points` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`assay_id` integer NOT NULL,
	`line` integer NOT NULL,
	`temp_c` real NOT NULL,
	`time_h` real NOT NULL,
	`residual` real NOT NULL,
	`note` text,
	FOREIGN KEY (`assay_id`) REFERENCES `assays`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `assay_points_assay_idx` ON `assay_points` (`assay_id`);--> statement-breakpoint
CREATE TABLE `assays` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`site_id` integer NOT NULL,
	`lot_id` integer NOT NULL,
	`source` text NOT NULL,
	`file_name` text,
	`scale` text NOT NULL,
	`scale_note` text NOT NULL,
	`fit` text,
	`fit_problem` text,
	`point_count` integer NOT NULL,
	`created_by` integer,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`lot_id`) REFERENCES `lots`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `assays_lot_idx` ON `assays` (`lot_id`);--> statement-breakpoint
CREATE TABLE `certificate_files` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`site_id` integer NOT NULL,
	`lot_id` integer NOT NULL,
	`file_name` text NOT NULL,
	`mime_type` text NOT NULL,
	`size_bytes` integer NOT NULL,
	`sha256` text NOT NULL,
	`uploaded_by` integer,
	`uploaded_at` text NOT NULL,
	FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`lot_id`) REFERENCES `lots`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`uploaded_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `certificate_files_lot_idx` ON `certificate_files` (`lot_id`);