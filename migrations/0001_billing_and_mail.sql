CREATE TABLE `mail_outbox` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`site_id` integer,
	`to` text NOT NULL,
	`subject` text NOT NULL,
	`text` text NOT NULL,
	`html` text,
	`kind` text NOT NULL,
	`status` text DEFAULT 'pending' NOT NULL,
	`attempts` integer DEFAULT 0 NOT NULL,
	`last_error` text,
	`next_attempt_at` text NOT NULL,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	`sent_at` text,
	FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `mail_outbox_due_idx` ON `mail_outbox` (`status`,`next_attempt_at`);--> statement-breakpoint
CREATE INDEX `mail_outbox_site_idx` ON `mail_outbox` (`site_id`,`id`);--> statement-breakpoint
CREATE TABLE `billing_events` (
	`event_id` text PRIMARY KEY NOT NULL,
	`type` text NOT NULL,
	`site_id` integer,
	`received_at` text NOT NULL
);
--> statement-breakpoint
CREATE TABLE `invites` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`site_id` integer NOT NULL,
	`email` text NOT NULL,
	`role` text NOT NULL,
	`token_hash` text NOT NULL,
	`invited_by` integer NOT NULL,
	`expires_at` text NOT NULL,
	`accepted_at` text,
	`revoked_at` text,
	`user_id` integer,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`invited_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `invites_token_unique` ON `invites` (`token_hash`);--> statement-breakpoint
CREATE INDEX `invites_site_idx` ON `invites` (`site_id`);--> statement-breakpoint
CREATE TABLE `invoices` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`site_id` integer NOT NULL,
	`stripe_invoice_id` text NOT NULL,
	`number` text NOT NULL,
	`status` text NOT NULL,
	`currency` text NOT NULL,
	`amount_due_cents` integer NOT NULL,
	`amount_paid_cents` integer NOT NULL,
	`seats` integer NOT NULL,
	`period_start` text NOT NULL,
	`period_end` text NOT NULL,
	`hosted_url` text,
	`issued_at` text NOT NULL,
	FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `invoices_stripe_unique` ON `invoices` (`stripe_invoice_id`);--> statement-breakpoint
CREATE INDEX `invoices_site_idx` ON `invoices` (`site_id`,`issued_at`);--> statement-breakpoint
CREATE TABLE `subscriptions` (
	`site_id` integer PRIMARY KEY NOT NULL,
	`plan` text NOT NULL,
	`seats` integer NOT NULL,
	`status` text NOT NULL,
	`grace_ends_at` text,
	`current_period_end` text,
	`stripe_customer_id` text,
	`stripe_subscription_id` text,
	`stripe_item_id` text,
	`last_event_created` integer DEFAULT 0 NOT NULL,
	`updated_at` text NOT NULL,
	FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON UPDATE no action ON DELETE no action
);
