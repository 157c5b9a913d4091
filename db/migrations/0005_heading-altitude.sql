ALTER TABLE `observations` ADD `heading` real;--> statement-breakpoint
ALTER TABLE `observations` ADD `heading_source` text;--> statement-breakpoint
ALTER TABLE `observations` ADD `altitude` real;--> statement-breakpoint
ALTER TABLE `observations` ADD `altitude_source` text;