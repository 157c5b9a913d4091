CREATE TABLE `samples` (
	`observation_id` text PRIMARY KEY NOT NULL,
	`campaign_id` text NOT NULL,
	`sample_number` text NOT NULL,
	`sample_type` text NOT NULL,
	`gear` text,
	`container` text,
	`preservation` text,
	`parent_sample_number` text,
	`lab` text,
	`updated_at` integer NOT NULL,
	FOREIGN KEY (`observation_id`) REFERENCES `observations`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`campaign_id`) REFERENCES `campaigns`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE UNIQUE INDEX `sample_number_unique` ON `samples` (`campaign_id`,lower("sample_number"));