CREATE TABLE `photo_measurements` (
	`id` text PRIMARY KEY NOT NULL,
	`photo_id` text NOT NULL,
	`observation_id` text NOT NULL,
	`kind` text NOT NULL,
	`spacing_cm` real NOT NULL,
	`laser` text NOT NULL,
	`points` text NOT NULL,
	`placement_px` real NOT NULL,
	`value` real NOT NULL,
	`unit` text NOT NULL,
	`uncertainty` real NOT NULL,
	`created_by` text NOT NULL,
	`created_at` integer NOT NULL,
	`retired` integer DEFAULT false NOT NULL,
	FOREIGN KEY (`photo_id`) REFERENCES `photos`(`id`) ON UPDATE no action ON DELETE restrict,
	FOREIGN KEY (`observation_id`) REFERENCES `observations`(`id`) ON UPDATE no action ON DELETE restrict,
	FOREIGN KEY (`created_by`) REFERENCES `user`(`id`) ON UPDATE no action ON DELETE restrict
);
--> statement-breakpoint
CREATE INDEX `photo_measurement_photo_idx` ON `photo_measurements` (`photo_id`);--> statement-breakpoint
CREATE INDEX `photo_measurement_observation_idx` ON `photo_measurements` (`observation_id`);