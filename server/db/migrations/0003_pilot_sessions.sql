CREATE TABLE `display_tokens` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`session_id` integer NOT NULL,
	`token_hash` text NOT NULL,
	`expires_at` integer NOT NULL,
	`used_at` integer,
	`created_by` integer,
	`created_at` integer NOT NULL,
	FOREIGN KEY (`session_id`) REFERENCES `pilot_sessions`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE UNIQUE INDEX `display_tokens_token_hash_unique` ON `display_tokens` (`token_hash`);--> statement-breakpoint
CREATE INDEX `display_tokens_session_idx` ON `display_tokens` (`session_id`);--> statement-breakpoint
CREATE TABLE `embedded_rigs` (
	`rig_id` integer PRIMARY KEY NOT NULL,
	`profile` text NOT NULL,
	FOREIGN KEY (`rig_id`) REFERENCES `rigs`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE TABLE `feed_chunks` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`feed_id` integer NOT NULL,
	`seq` integer NOT NULL,
	`first_sample` integer NOT NULL,
	`sample_count` integer NOT NULL,
	`channel_count` integer NOT NULL,
	`samples` blob NOT NULL,
	FOREIGN KEY (`feed_id`) REFERENCES `feeds`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE UNIQUE INDEX `feed_chunks_feed_seq_uq` ON `feed_chunks` (`feed_id`,`seq`);--> statement-breakpoint
CREATE INDEX `feed_chunks_feed_sample_idx` ON `feed_chunks` (`feed_id`,`first_sample`);--> statement-breakpoint
CREATE TABLE `feed_marks` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`feed_id` integer NOT NULL,
	`seq` integer NOT NULL,
	`kind` text NOT NULL,
	`sample` integer NOT NULL,
	`to_sample` integer,
	`cue_id` integer,
	`label` text,
	`reason` text,
	FOREIGN KEY (`feed_id`) REFERENCES `feeds`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE UNIQUE INDEX `feed_marks_feed_seq_uq` ON `feed_marks` (`feed_id`,`seq`);--> statement-breakpoint
CREATE INDEX `feed_marks_feed_sample_idx` ON `feed_marks` (`feed_id`,`sample`);--> statement-breakpoint
CREATE TABLE `feeds` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`rig_id` integer NOT NULL,
	`bridge_session_id` text NOT NULL,
	`channel_names` text NOT NULL,
	`units` text NOT NULL,
	`sample_rate_hz` real NOT NULL,
	`start_time` text NOT NULL,
	`durable_seq` integer DEFAULT 0 NOT NULL,
	`next_sample` integer DEFAULT 0 NOT NULL,
	`created_at` integer NOT NULL,
	`last_seen_at` integer NOT NULL,
	FOREIGN KEY (`rig_id`) REFERENCES `rigs`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `feeds_rig_bridge_uq` ON `feeds` (`rig_id`,`bridge_session_id`);--> statement-breakpoint
CREATE TABLE `pilot_sessions` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`study_id` integer NOT NULL,
	`participant_id` integer NOT NULL,
	`rig_id` integer NOT NULL,
	`decoder_id` integer NOT NULL,
	`status` text DEFAULT 'ready' NOT NULL,
	`notes` text DEFAULT '' NOT NULL,
	`feed_id` integer,
	`start_sample` integer,
	`stop_sample` integer,
	`dropped_samples` integer DEFAULT 0 NOT NULL,
	`gap_count` integer DEFAULT 0 NOT NULL,
	`artifact_limits` text,
	`created_by` integer,
	`created_at` integer NOT NULL,
	`started_at` integer,
	`stopped_at` integer,
	FOREIGN KEY (`study_id`) REFERENCES `studies`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`participant_id`) REFERENCES `participants`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`rig_id`) REFERENCES `rigs`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`decoder_id`) REFERENCES `decoders`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`feed_id`) REFERENCES `feeds`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `pilot_sessions_study_idx` ON `pilot_sessions` (`study_id`);--> statement-breakpoint
CREATE INDEX `pilot_sessions_rig_status_idx` ON `pilot_sessions` (`rig_id`,`status`);--> statement-breakpoint
CREATE TABLE `session_events` (
	`id` integer PRIMARY KEY NOT NULL,
	`session_id` integer NOT NULL,
	`at` integer NOT NULL,
	`kind` text NOT NULL,
	`text` text NOT NULL,
	`sample_index` integer,
	FOREIGN KEY (`session_id`) REFERENCES `pilot_sessions`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE INDEX `session_events_session_idx` ON `session_events` (`session_id`,`id`);--> statement-breakpoint
CREATE TABLE `trials` (
	`id` integer PRIMARY KEY NOT NULL,
	`session_id` integer NOT NULL,
	`cue_id` integer NOT NULL,
	`sample_index` integer NOT NULL,
	`onset_s` real NOT NULL,
	`true_class` text,
	`predicted_class` text NOT NULL,
	`probabilities` text NOT NULL,
	`latency` text NOT NULL,
	`flags` text NOT NULL,
	`artifact_channels` text NOT NULL,
	`marked_bad` integer DEFAULT false NOT NULL,
	`note` text,
	`created_at` integer NOT NULL,
	FOREIGN KEY (`session_id`) REFERENCES `pilot_sessions`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE UNIQUE INDEX `trials_session_cue_uq` ON `trials` (`session_id`,`cue_id`);--> statement-breakpoint
-- A database seeded before this migration: its demo rig is the one the embedded bridge serves.
INSERT INTO `embedded_rigs` (`rig_id`, `profile`) SELECT `id`, 'demo-hand-imagery' FROM `rigs`
WHERE `name` = 'Demo rig' AND `location` = 'Synthetic bridge (bundled)';
