CREATE TABLE `link_gaps` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`site_id` integer NOT NULL,
	`batch_id` integer NOT NULL,
	`from_at` text NOT NULL,
	`to_at` text NOT NULL,
	`reason` text NOT NULL,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`batch_id`) REFERENCES `batches`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `link_gaps_batch_idx` ON `link_gaps` (`batch_id`,`from_at`);--> statement-breakpoint
CREATE TABLE `link_settings` (
	`site_id` integer PRIMARY KEY NOT NULL,
	`sampling_interval_ms` integer NOT NULL,
	`deadband_c` real NOT NULL,
	`updated_at` text NOT NULL,
	FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE TABLE `vessel_sources` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`site_id` integer NOT NULL,
	`vessel_id` integer NOT NULL,
	`endpoint_url` text NOT NULL,
	`node_id` text NOT NULL,
	`unit` text NOT NULL,
	`security_policy` text NOT NULL,
	`security_mode` text NOT NULL,
	`user_name` text,
	`password` text,
	`is_enabled` integer DEFAULT true NOT NULL,
	`trusted_thumbprint` text,
	`trusted_at` text,
	`trusted_by` integer,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	`updated_at` text NOT NULL,
	FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`vessel_id`) REFERENCES `vessels`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`trusted_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `vessel_sources_vessel_unique` ON `vessel_sources` (`vessel_id`);--> statement-breakpoint
CREATE INDEX `vessel_sources_site_idx` ON `vessel_sources` (`site_id`);