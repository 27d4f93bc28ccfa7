CREATE TABLE `batch_readings` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`site_id` integer NOT NULL,
	`batch_id` integer NOT NULL,
	`client_key` text NOT NULL,
	`taken_at` text NOT NULL,
	`c` real NOT NULL,
	`note` text,
	`source` text NOT NULL,
	`entered_by` integer NOT NULL,
	`received_at` text NOT NULL,
	FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`batch_id`) REFERENCES `batches`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`entered_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `batch_readings_key_unique` ON `batch_readings` (`batch_id`,`client_key`);--> statement-breakpoint
CREATE INDEX `batch_readings_time_idx` ON `batch_readings` (`batch_id`,`taken_at`);--> statement-breakpoint
CREATE TABLE `batch_settings` (
	`site_id` integer PRIMARY KEY NOT NULL,
	`tolerance_c` real NOT NULL,
	`gap_limit_min` integer NOT NULL,
	`updated_at` text NOT NULL,
	FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE TABLE `batches` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`site_id` integer NOT NULL,
	`recipe_id` integer NOT NULL,
	`vessel_id` integer NOT NULL,
	`lot_id` integer NOT NULL,
	`plan_id` integer,
	`source` text NOT NULL,
	`program` text NOT NULL,
	`state` text DEFAULT 'running' NOT NULL,
	`started_at` text NOT NULL,
	`started_by` integer NOT NULL,
	`closed_at` text,
	`closed_by` integer,
	`close_comment` text,
	`measured_product_g_per_l` real,
	`forecast_at_close_g_per_l` real,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`recipe_id`) REFERENCES `recipes`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`vessel_id`) REFERENCES `vessels`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`lot_id`) REFERENCES `lots`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`plan_id`) REFERENCES `plans`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`started_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`closed_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `batches_site_idx` ON `batches` (`site_id`,`state`,`id`);--> statement-breakpoint
CREATE TABLE `deviations` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`site_id` integer NOT NULL,
	`batch_id` integer NOT NULL,
	`kind` text NOT NULL,
	`state` text DEFAULT 'open' NOT NULL,
	`reading_id` integer,
	`at` text NOT NULL,
	`message` text NOT NULL,
	`value_c` real,
	`expected_c` real,
	`corrective` text,
	`raised_at` text NOT NULL,
	`acknowledged_by` integer,
	`acknowledged_at` text,
	`acknowledge_comment` text,
	`closed_by` integer,
	`closed_at` text,
	`close_comment` text,
	FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`batch_id`) REFERENCES `batches`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`reading_id`) REFERENCES `batch_readings`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`acknowledged_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`closed_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `deviations_batch_idx` ON `deviations` (`batch_id`,`id`);