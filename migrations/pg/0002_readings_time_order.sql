DROP INDEX "batch_readings_time_idx";--> statement-breakpoint
CREATE INDEX "batch_readings_time_idx" ON "batch_readings" USING btree ("batch_id","taken_at","id");