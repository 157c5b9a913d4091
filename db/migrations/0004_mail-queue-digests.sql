CREATE TABLE `mail_queue` (
	`id` text PRIMARY KEY NOT NULL,
	`kind` text NOT NULL,
	`ref` text,
	`campaign_id` text,
	`to` text NOT NULL,
	`to_name` text,
	`subject` text NOT NULL,
	`payload` text NOT NULL,
	`state` text DEFAULT 'queued' NOT NULL,
	`attempts` integer DEFAULT 0 NOT NULL,
	`next_attempt_at` integer,
	`last_error` text,
	`created_at` integer NOT NULL,
	`updated_at` integer NOT NULL,
	`sent_at` integer,
	FOREIGN KEY (`campaign_id`) REFERENCES `campaigns`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE INDEX `mail_queue_due_idx` ON `mail_queue` (`state`,`next_attempt_at`);--> statement-breakpoint
CREATE INDEX `mail_queue_ref_idx` ON `mail_queue` (`ref`);--> statement-breakpoint
ALTER TABLE `digests` ADD `until` integer;--> statement-breakpoint
ALTER TABLE `digests` ADD `trigger` text;--> statement-breakpoint
ALTER TABLE `digests` ADD `dive_id` text REFERENCES dives(id);--> statement-breakpoint
ALTER TABLE `digests` ADD `mail_id` text;--> statement-breakpoint
ALTER TABLE `subscriptions` ADD `unsubscribe_nonce` text;--> statement-breakpoint
ALTER TABLE `subscriptions` ADD `daily_done_for` integer;