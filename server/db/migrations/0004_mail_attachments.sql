CREATE TABLE `mail_attachments` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`mail_id` integer NOT NULL,
	`file_name` text NOT NULL,
	`content_type` text NOT NULL,
	`size` integer NOT NULL,
	`content` blob NOT NULL,
	FOREIGN KEY (`mail_id`) REFERENCES `mail_outbox`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE INDEX `mail_attachments_mail_idx` ON `mail_attachments` (`mail_id`);