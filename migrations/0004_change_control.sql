CREATE TABLE `change_requests` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`site_id` integer NOT NULL,
	`recipe_id` integer NOT NULL,
	`plan_id` integer NOT NULL,
	`proposed_by` integer NOT NULL,
	`rationale` text NOT NULL,
	`expected_effect` text NOT NULL,
	`effective_from` text NOT NULL,
	`status` text DEFAULT 'proposed' NOT NULL,
	`record_hash` text NOT NULL,
	`created_at` text NOT NULL,
	`decided_at` text,
	`replaced` text,
	FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`recipe_id`) REFERENCES `recipes`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`plan_id`) REFERENCES `plans`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`proposed_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `change_requests_site_idx` ON `change_requests` (`site_id`,`status`,`id`);--> statement-breakpoint
CREATE TABLE `signatures` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`site_id` integer NOT NULL,
	`change_request_id` integer NOT NULL,
	`user_id` integer NOT NULL,
	`printed_name` text NOT NULL,
	`role` text NOT NULL,
	`meaning` text NOT NULL,
	`comment` text NOT NULL,
	`signed_at` text NOT NULL,
	`site_time_zone` text NOT NULL,
	`record_hash` text NOT NULL,
	FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`change_request_id`) REFERENCES `change_requests`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `signatures_request_idx` ON `signatures` (`change_request_id`,`id`);