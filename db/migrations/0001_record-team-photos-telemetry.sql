CREATE TABLE `audit_log` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`campaign_id` text,
	`actor_id` text,
	`action` text NOT NULL,
	`target` text,
	`detail` text,
	`at` integer NOT NULL
);
--> statement-breakpoint
CREATE INDEX `audit_campaign_idx` ON `audit_log` (`campaign_id`,`at`);--> statement-breakpoint
CREATE TABLE `caught_mail` (
	`id` text PRIMARY KEY NOT NULL,
	`to` text NOT NULL,
	`from` text NOT NULL,
	`subject` text NOT NULL,
	`text` text NOT NULL,
	`html` text NOT NULL,
	`headers` text NOT NULL,
	`received_at` integer NOT NULL
);
--> statement-breakpoint
CREATE TABLE `custody_events` (
	`id` text PRIMARY KEY NOT NULL,
	`observation_id` text NOT NULL,
	`holder` text NOT NULL,
	`since` integer NOT NULL,
	`location` text NOT NULL,
	`container` text,
	`note` text,
	`recorded_by` text NOT NULL,
	`created_at` integer NOT NULL,
	FOREIGN KEY (`observation_id`) REFERENCES `observations`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`recorded_by`) REFERENCES `user`(`id`) ON UPDATE no action ON DELETE restrict
);
--> statement-breakpoint
CREATE INDEX `custody_observation_idx` ON `custody_events` (`observation_id`,`since`);--> statement-breakpoint
CREATE TABLE `digests` (
	`id` text PRIMARY KEY NOT NULL,
	`campaign_id` text NOT NULL,
	`user_id` text NOT NULL,
	`subject` text NOT NULL,
	`observation_count` integer NOT NULL,
	`since` integer,
	`sent_at` integer NOT NULL,
	`sent_by` text,
	FOREIGN KEY (`campaign_id`) REFERENCES `campaigns`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`user_id`) REFERENCES `user`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`sent_by`) REFERENCES `user`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `digest_campaign_idx` ON `digests` (`campaign_id`,`sent_at`);--> statement-breakpoint
CREATE TABLE `finds` (
	`observation_id` text PRIMARY KEY NOT NULL,
	`campaign_id` text NOT NULL,
	`find_number` text NOT NULL,
	`object_type` text,
	`material` text,
	`condition` text,
	`state` text DEFAULT 'in-situ' NOT NULL,
	`updated_at` integer NOT NULL,
	FOREIGN KEY (`observation_id`) REFERENCES `observations`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`campaign_id`) REFERENCES `campaigns`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE UNIQUE INDEX `find_number_unique` ON `finds` (`campaign_id`,lower("find_number"));--> statement-breakpoint
CREATE TABLE `identifications` (
	`observation_id` text PRIMARY KEY NOT NULL,
	`scientific_name` text NOT NULL,
	`taxon_rank` text,
	`qualifier` text,
	`confidence` text,
	`taxon_id` text,
	`verification_status` text DEFAULT 'unverified' NOT NULL,
	`verified_by` text,
	`verified_at` integer,
	`verification_note` text,
	`identified_by` text NOT NULL,
	`updated_at` integer NOT NULL,
	FOREIGN KEY (`observation_id`) REFERENCES `observations`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`verified_by`) REFERENCES `user`(`id`) ON UPDATE no action ON DELETE restrict,
	FOREIGN KEY (`identified_by`) REFERENCES `user`(`id`) ON UPDATE no action ON DELETE restrict
);
--> statement-breakpoint
CREATE TABLE `invitations` (
	`id` text PRIMARY KEY NOT NULL,
	`campaign_id` text NOT NULL,
	`email` text NOT NULL,
	`role` text NOT NULL,
	`status` text DEFAULT 'pending' NOT NULL,
	`invited_by` text NOT NULL,
	`created_at` integer NOT NULL,
	`expires_at` integer NOT NULL,
	`sent_at` integer,
	`accepted_at` integer,
	`accepted_by` text,
	FOREIGN KEY (`campaign_id`) REFERENCES `campaigns`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`invited_by`) REFERENCES `user`(`id`) ON UPDATE no action ON DELETE restrict,
	FOREIGN KEY (`accepted_by`) REFERENCES `user`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `invitation_campaign_idx` ON `invitations` (`campaign_id`);--> statement-breakpoint
CREATE INDEX `invitation_email_idx` ON `invitations` (`email`);--> statement-breakpoint
CREATE TABLE `live_events` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`campaign_id` text NOT NULL,
	`dive_id` text NOT NULL,
	`type` text NOT NULL,
	`payload` text NOT NULL,
	`at` integer NOT NULL
);
--> statement-breakpoint
CREATE INDEX `live_event_dive_idx` ON `live_events` (`dive_id`,`id`);--> statement-breakpoint
CREATE TABLE `observation_revisions` (
	`id` text PRIMARY KEY NOT NULL,
	`observation_id` text NOT NULL,
	`version` integer NOT NULL,
	`action` text NOT NULL,
	`snapshot` text NOT NULL,
	`edited_by` text NOT NULL,
	`edited_at` integer NOT NULL,
	FOREIGN KEY (`observation_id`) REFERENCES `observations`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`edited_by`) REFERENCES `user`(`id`) ON UPDATE no action ON DELETE restrict
);
--> statement-breakpoint
CREATE UNIQUE INDEX `revision_version_unique` ON `observation_revisions` (`observation_id`,`version`,`action`);--> statement-breakpoint
CREATE TABLE `photos` (
	`id` text PRIMARY KEY NOT NULL,
	`observation_id` text NOT NULL,
	`campaign_id` text NOT NULL,
	`sha256` text NOT NULL,
	`mime` text NOT NULL,
	`width` integer NOT NULL,
	`height` integer NOT NULL,
	`bytes` integer NOT NULL,
	`original_key` text NOT NULL,
	`display_key` text NOT NULL,
	`thumb_key` text NOT NULL,
	`original_name` text,
	`caption` text,
	`credit` text,
	`captured_at` integer,
	`lat` real,
	`lon` real,
	`position` integer DEFAULT 0 NOT NULL,
	`uploaded_by` text NOT NULL,
	`retired` integer DEFAULT false NOT NULL,
	`created_at` integer NOT NULL,
	FOREIGN KEY (`observation_id`) REFERENCES `observations`(`id`) ON UPDATE no action ON DELETE restrict,
	FOREIGN KEY (`campaign_id`) REFERENCES `campaigns`(`id`) ON UPDATE no action ON DELETE restrict,
	FOREIGN KEY (`uploaded_by`) REFERENCES `user`(`id`) ON UPDATE no action ON DELETE restrict
);
--> statement-breakpoint
CREATE INDEX `photo_observation_idx` ON `photos` (`observation_id`,`position`);--> statement-breakpoint
CREATE INDEX `photo_campaign_sha_idx` ON `photos` (`campaign_id`,`sha256`);--> statement-breakpoint
CREATE TABLE `quick_marks` (
	`id` text PRIMARY KEY NOT NULL,
	`campaign_id` text NOT NULL,
	`label` text NOT NULL,
	`kind` text NOT NULL,
	`tags` text DEFAULT '[]' NOT NULL,
	`position` integer DEFAULT 0 NOT NULL,
	`retired` integer DEFAULT false NOT NULL,
	`created_at` integer NOT NULL,
	FOREIGN KEY (`campaign_id`) REFERENCES `campaigns`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE INDEX `quick_mark_campaign_idx` ON `quick_marks` (`campaign_id`,`position`);--> statement-breakpoint
CREATE TABLE `subscriptions` (
	`campaign_id` text NOT NULL,
	`user_id` text NOT NULL,
	`frequency` text DEFAULT 'off' NOT NULL,
	`filters` text DEFAULT '{}' NOT NULL,
	`last_digest_at` integer,
	`updated_at` integer NOT NULL,
	PRIMARY KEY(`campaign_id`, `user_id`),
	FOREIGN KEY (`campaign_id`) REFERENCES `campaigns`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`user_id`) REFERENCES `user`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE TABLE `telemetry_imports` (
	`id` text PRIMARY KEY NOT NULL,
	`dive_id` text NOT NULL,
	`file_name` text,
	`mode` text NOT NULL,
	`rows_taken` integer NOT NULL,
	`rows_rejected` integer NOT NULL,
	`first_at` integer,
	`last_at` integer,
	`report` text NOT NULL,
	`imported_by` text NOT NULL,
	`imported_at` integer NOT NULL,
	FOREIGN KEY (`dive_id`) REFERENCES `dives`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`imported_by`) REFERENCES `user`(`id`) ON UPDATE no action ON DELETE restrict
);
--> statement-breakpoint
CREATE INDEX `telemetry_import_dive_idx` ON `telemetry_imports` (`dive_id`,`imported_at`);--> statement-breakpoint
CREATE TABLE `telemetry_samples` (
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
);
--> statement-breakpoint
ALTER TABLE `campaigns` ADD `keep_photo_positions` integer DEFAULT false NOT NULL;--> statement-breakpoint
ALTER TABLE `dives` ADD `recording_start_at` integer;--> statement-breakpoint
ALTER TABLE `dives` ADD `frame_rate` text;--> statement-breakpoint
ALTER TABLE `dives` ADD `telemetry_gap_s` real DEFAULT 30 NOT NULL;