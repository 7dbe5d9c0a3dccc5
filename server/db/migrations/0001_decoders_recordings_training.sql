CREATE TABLE `decoders` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`study_id` integer NOT NULL,
	`name` text NOT NULL,
	`recipe` text NOT NULL,
	`classes` text NOT NULL,
	`channel_names` text NOT NULL,
	`sample_rate_hz` real NOT NULL,
	`epoch_start_s` real NOT NULL,
	`epoch_end_s` real NOT NULL,
	`artifact` text NOT NULL,
	`sha256` text NOT NULL,
	`status` text DEFAULT 'draft' NOT NULL,
	`metrics` text NOT NULL,
	`report` text,
	`interpretation` text,
	`source` text NOT NULL,
	`created_by` integer,
	`created_at` integer NOT NULL,
	`frozen_at` integer,
	`frozen_by` integer,
	FOREIGN KEY (`study_id`) REFERENCES `studies`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null,
	FOREIGN KEY (`frozen_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `decoders_study_idx` ON `decoders` (`study_id`);--> statement-breakpoint
CREATE INDEX `decoders_sha256_idx` ON `decoders` (`sha256`);--> statement-breakpoint
CREATE TABLE `recording_chunks` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`recording_id` integer NOT NULL,
	`first_sample` integer NOT NULL,
	`sample_count` integer NOT NULL,
	`data` blob NOT NULL,
	FOREIGN KEY (`recording_id`) REFERENCES `recordings`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE UNIQUE INDEX `recording_chunks_recording_first_uq` ON `recording_chunks` (`recording_id`,`first_sample`);--> statement-breakpoint
CREATE TABLE `recording_cues` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`recording_id` integer NOT NULL,
	`onset_s` real NOT NULL,
	`duration_s` real DEFAULT 0 NOT NULL,
	`label` text NOT NULL,
	`sample_index` integer NOT NULL,
	FOREIGN KEY (`recording_id`) REFERENCES `recordings`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE INDEX `recording_cues_recording_idx` ON `recording_cues` (`recording_id`,`onset_s`);--> statement-breakpoint
CREATE TABLE `recordings` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`study_id` integer NOT NULL,
	`participant_id` integer,
	`name` text NOT NULL,
	`source` text NOT NULL,
	`format` text NOT NULL,
	`channel_names` text NOT NULL,
	`sample_rate_hz` real NOT NULL,
	`sample_count` integer NOT NULL,
	`duration_s` real NOT NULL,
	`cue_counts` text NOT NULL,
	`file_bytes` blob,
	`file_sha256` text,
	`created_by` integer,
	`created_at` integer NOT NULL,
	FOREIGN KEY (`study_id`) REFERENCES `studies`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`participant_id`) REFERENCES `participants`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `recordings_study_idx` ON `recordings` (`study_id`);--> statement-breakpoint
CREATE TABLE `training_jobs` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`study_id` integer NOT NULL,
	`name` text NOT NULL,
	`status` text DEFAULT 'queued' NOT NULL,
	`progress` real DEFAULT 0 NOT NULL,
	`stage` text DEFAULT 'queued' NOT NULL,
	`params` text NOT NULL,
	`purpose` text DEFAULT 'user' NOT NULL,
	`error` text,
	`decoder_id` integer,
	`created_by` integer,
	`created_at` integer NOT NULL,
	`started_at` integer,
	`finished_at` integer,
	FOREIGN KEY (`study_id`) REFERENCES `studies`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`decoder_id`) REFERENCES `decoders`(`id`) ON UPDATE no action ON DELETE set null,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `training_jobs_study_idx` ON `training_jobs` (`study_id`);--> statement-breakpoint
CREATE INDEX `training_jobs_status_idx` ON `training_jobs` (`status`);