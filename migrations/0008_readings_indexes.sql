CREATE INDEX `batch_readings_batch_idx` ON `batch_readings` (`batch_id`);--> statement-breakpoint
CREATE INDEX `batch_readings_entered_idx` ON `batch_readings` (`entered_by`,`batch_id`);