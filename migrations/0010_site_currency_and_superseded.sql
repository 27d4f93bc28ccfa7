ALTER TABLE `sites` ADD `currency` text DEFAULT 'EUR' NOT NULL;--> statement-breakpoint
ALTER TABLE `change_requests` ADD `superseded_by` integer;