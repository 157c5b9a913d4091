CREATE TABLE `__new_telemetry_samples` (
	`dive_id` text NOT NULL,
	`t` integer NOT NULL,
	`depth` real,
	`pressure` real,
	`lat` real,
	`lon` real,
	`heading` real,
	`altitude` real,
	`temperature` real,
	`salinity` real,
	PRIMARY KEY(`dive_id`, `t`),
	FOREIGN KEY (`dive_id`) REFERENCES `dives`(`id`) ON UPDATE no action ON DELETE cascade
) WITHOUT ROWID;
--> statement-breakpoint
INSERT INTO `__new_telemetry_samples` (`dive_id`, `t`, `depth`, `pressure`, `lat`, `lon`, `heading`, `altitude`, `temperature`, `salinity`)
	SELECT `dive_id`, `t`, `depth`, `pressure`, `lat`, `lon`, `heading`, `altitude`, `temperature`, `salinity` FROM `telemetry_samples`;
--> statement-breakpoint
DROP TABLE `telemetry_samples`;
--> statement-breakpoint
ALTER TABLE `__new_telemetry_samples` RENAME TO `telemetry_samples`;
