CREATE TABLE `checklist_taxa` (
	`id` text PRIMARY KEY NOT NULL,
	`campaign_id` text NOT NULL,
	`scientific_name` text NOT NULL,
	`authorship` text,
	`taxon_rank` text,
	`identifier` text,
	`vernacular_name` text,
	`genus` text,
	`specific_epithet` text,
	`infraspecific_rank` text,
	`infraspecific_epithet` text,
	`imported_at` integer NOT NULL,
	`imported_by` text NOT NULL,
	FOREIGN KEY (`campaign_id`) REFERENCES `campaigns`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`imported_by`) REFERENCES `user`(`id`) ON UPDATE no action ON DELETE restrict
);
--> statement-breakpoint
CREATE UNIQUE INDEX `checklist_name_unique` ON `checklist_taxa` (`campaign_id`,lower("scientific_name"));--> statement-breakpoint
CREATE TABLE `observation_sizes` (
	`observation_id` text NOT NULL,
	`dimension` text NOT NULL,
	`value_cm` real NOT NULL,
	`method` text NOT NULL,
	PRIMARY KEY(`observation_id`, `dimension`),
	FOREIGN KEY (`observation_id`) REFERENCES `observations`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE TABLE `substrate_classes` (
	`id` text PRIMARY KEY NOT NULL,
	`campaign_id` text NOT NULL,
	`name` text NOT NULL,
	`origin` text,
	`standard_name` text,
	`retired` integer DEFAULT false NOT NULL,
	`position` integer DEFAULT 0 NOT NULL,
	`created_at` integer NOT NULL,
	FOREIGN KEY (`campaign_id`) REFERENCES `campaigns`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE UNIQUE INDEX `substrate_name_unique` ON `substrate_classes` (`campaign_id`,lower("name"));--> statement-breakpoint
ALTER TABLE `observations` ADD `individual_count` integer;--> statement-breakpoint
ALTER TABLE `observations` ADD `organism_quantity` real;--> statement-breakpoint
ALTER TABLE `observations` ADD `organism_quantity_type` text;--> statement-breakpoint
ALTER TABLE `observations` ADD `substrate_id` text REFERENCES substrate_classes(id);