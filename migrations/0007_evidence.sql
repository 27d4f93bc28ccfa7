CREATE TABLE `calibration_exclusions` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`site_id` integer NOT NULL,
	`batch_id` integer NOT NULL,
	`reason` text NOT NULL,
	`excluded_by` integer NOT NULL,
	`excluded_at` text NOT NULL,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`batch_id`) REFERENCES `batches`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`excluded_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `calibration_exclusions_batch_unique` ON `calibration_exclusions` (`batch_id`);--> statement-breakpoint
CREATE TABLE `calibrations` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`site_id` integer NOT NULL,
	`recipe_id` integer NOT NULL,
	`lot_id` integer NOT NULL,
	`state` text NOT NULL,
	`batch_ids` text NOT NULL,
	`result` text NOT NULL,
	`created_at` text NOT NULL,
	`decided_by` integer,
	`decided_at` text,
	FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`recipe_id`) REFERENCES `recipes`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`lot_id`) REFERENCES `lots`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`decided_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `calibrations_recipe_lot_idx` ON `calibrations` (`site_id`,`recipe_id`,`lot_id`,`state`);