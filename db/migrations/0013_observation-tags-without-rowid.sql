DROP INDEX `observation_author_idx`;--> statement-breakpoint
CREATE TABLE `__new_observation_tags` (
	`observation_id` text NOT NULL,
	`tag_id` text NOT NULL,
	PRIMARY KEY(`observation_id`, `tag_id`),
	FOREIGN KEY (`observation_id`) REFERENCES `observations`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`tag_id`) REFERENCES `tags`(`id`) ON UPDATE no action ON DELETE restrict
) WITHOUT ROWID;
--> statement-breakpoint
INSERT INTO `__new_observation_tags` (`observation_id`, `tag_id`) SELECT `observation_id`, `tag_id` FROM `observation_tags`;
--> statement-breakpoint
DROP TABLE `observation_tags`;
--> statement-breakpoint
ALTER TABLE `__new_observation_tags` RENAME TO `observation_tags`;
--> statement-breakpoint
CREATE INDEX `observation_tag_tag_idx` ON `observation_tags` (`tag_id`);
