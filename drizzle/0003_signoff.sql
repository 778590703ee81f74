CREATE TABLE `signoffs` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`team_id` bigint unsigned NOT NULL,
	`reel_id` bigint unsigned NOT NULL,
	`signed_by` bigint unsigned,
	`signer_name` varchar(120) NOT NULL,
	`signed_at` datetime(3) NOT NULL,
	`spec_name` varchar(64) NOT NULL,
	`spec_title` varchar(120) NOT NULL,
	`spec_version` int NOT NULL,
	`spec_body` json NOT NULL,
	`engine_version` varchar(32) NOT NULL,
	`sheet_status` enum('pending','ready','failed') NOT NULL DEFAULT 'pending',
	`sheet_error` varchar(500),
	`pdf_key` varchar(255),
	`csv_key` varchar(255),
	`summary` json,
	`superseded_at` datetime(3),
	`superseded_by` bigint unsigned,
	`reopen_reason` varchar(1000),
	`created_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3) ON UPDATE CURRENT_TIMESTAMP,
	CONSTRAINT `signoffs_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
ALTER TABLE `signoffs` ADD CONSTRAINT `signoffs_team_id_teams_id_fk` FOREIGN KEY (`team_id`) REFERENCES `teams`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `signoffs` ADD CONSTRAINT `signoffs_reel_id_reels_id_fk` FOREIGN KEY (`reel_id`) REFERENCES `reels`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `signoffs` ADD CONSTRAINT `signoffs_signed_by_users_id_fk` FOREIGN KEY (`signed_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `signoffs` ADD CONSTRAINT `signoffs_superseded_by_users_id_fk` FOREIGN KEY (`superseded_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `signoffs_reel_idx` ON `signoffs` (`reel_id`,`signed_at`);--> statement-breakpoint
CREATE INDEX `signoffs_team_idx` ON `signoffs` (`team_id`);