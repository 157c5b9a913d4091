ALTER TABLE `observations` ADD `client_ref` text;--> statement-breakpoint
CREATE UNIQUE INDEX `observation_client_ref_unique` ON `observations` (`author_id`,`client_ref`);