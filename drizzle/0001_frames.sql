CREATE TABLE `analyses` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`frame_id` bigint unsigned NOT NULL,
	`team_id` bigint unsigned NOT NULL,
	`engine_version` varchar(32) NOT NULL,
	`spec_name` varchar(64) NOT NULL,
	`spec_version` int NOT NULL,
	`verdict` enum('pass','caution','fail') NOT NULL,
	`luma_min_ire` double NOT NULL,
	`luma_max_ire` double NOT NULL,
	`luma_mean_ire` double NOT NULL,
	`comp_min_ire` double NOT NULL,
	`comp_max_ire` double NOT NULL,
	`out_share` double NOT NULL,
	`result` json NOT NULL,
	`histograms` json NOT NULL,
	`images` json NOT NULL,
	`duration_ms` int NOT NULL,
	`created_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3) ON UPDATE CURRENT_TIMESTAMP,
	CONSTRAINT `analyses_id` PRIMARY KEY(`id`),
	CONSTRAINT `analyses_frame_uq` UNIQUE(`frame_id`)
);
--> statement-breakpoint
CREATE TABLE `frames` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`team_id` bigint unsigned NOT NULL,
	`reel_id` bigint unsigned NOT NULL,
	`seq` int NOT NULL,
	`name` varchar(255) NOT NULL,
	`timecode` varchar(16),
	`object_key` varchar(255) NOT NULL,
	`sha256` char(64) NOT NULL,
	`bytes` bigint unsigned NOT NULL,
	`format` enum('png','jpeg','tiff','webp','uyvy','v210') NOT NULL,
	`width` int NOT NULL,
	`height` int NOT NULL,
	`status` enum('queued','analysing','done','failed') NOT NULL DEFAULT 'queued',
	`fail_reason` varchar(500),
	`queued_at` datetime(3),
	`uploaded_by` bigint unsigned,
	`created_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3) ON UPDATE CURRENT_TIMESTAMP,
	CONSTRAINT `frames_id` PRIMARY KEY(`id`),
	CONSTRAINT `frames_reel_sha_uq` UNIQUE(`reel_id`,`sha256`),
	CONSTRAINT `frames_reel_seq_uq` UNIQUE(`reel_id`,`seq`)
);
--> statement-breakpoint
CREATE TABLE `uploads` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`team_id` bigint unsigned NOT NULL,
	`reel_id` bigint unsigned NOT NULL,
	`user_id` bigint unsigned,
	`object_key` varchar(255) NOT NULL,
	`name` varchar(255) NOT NULL,
	`bytes` bigint unsigned NOT NULL,
	`format` enum('png','jpeg','tiff','webp','uyvy','v210') NOT NULL,
	`raw_width` int,
	`raw_height` int,
	`multipart_id` varchar(255),
	`expires_at` datetime NOT NULL,
	`completed_at` datetime,
	`created_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3) ON UPDATE CURRENT_TIMESTAMP,
	CONSTRAINT `uploads_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
ALTER TABLE `reels` ADD `next_seq` int DEFAULT 1 NOT NULL;--> statement-breakpoint
ALTER TABLE `analyses` ADD CONSTRAINT `analyses_frame_id_frames_id_fk` FOREIGN KEY (`frame_id`) REFERENCES `frames`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `analyses` ADD CONSTRAINT `analyses_team_id_teams_id_fk` FOREIGN KEY (`team_id`) REFERENCES `teams`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `frames` ADD CONSTRAINT `frames_team_id_teams_id_fk` FOREIGN KEY (`team_id`) REFERENCES `teams`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `frames` ADD CONSTRAINT `frames_reel_id_reels_id_fk` FOREIGN KEY (`reel_id`) REFERENCES `reels`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `frames` ADD CONSTRAINT `frames_uploaded_by_users_id_fk` FOREIGN KEY (`uploaded_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `uploads` ADD CONSTRAINT `uploads_team_id_teams_id_fk` FOREIGN KEY (`team_id`) REFERENCES `teams`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `uploads` ADD CONSTRAINT `uploads_reel_id_reels_id_fk` FOREIGN KEY (`reel_id`) REFERENCES `reels`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `uploads` ADD CONSTRAINT `uploads_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `analyses_team_idx` ON `analyses` (`team_id`);--> statement-breakpoint
CREATE INDEX `frames_status_idx` ON `frames` (`status`,`queued_at`);--> statement-breakpoint
CREATE INDEX `uploads_reel_idx` ON `uploads` (`reel_id`);