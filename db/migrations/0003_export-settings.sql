ALTER TABLE `campaigns` ADD `export_licence` text DEFAULT 'CC-BY-4.0' NOT NULL;--> statement-breakpoint
ALTER TABLE `campaigns` ADD `public_positions` text DEFAULT 'grid-0.1' NOT NULL;