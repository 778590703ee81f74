CREATE TABLE `api_tokens` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`team_id` bigint unsigned NOT NULL,
	`user_id` bigint unsigned NOT NULL,
	`name` varchar(80) NOT NULL,
	`role` enum('owner','editor','reviewer','producer') NOT NULL,
	`token_hash` char(64) NOT NULL,
	`expires_at` datetime,
	`last_used_at` datetime,
	`revoked_at` datetime(3),
	`created_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3) ON UPDATE CURRENT_TIMESTAMP,
	CONSTRAINT `api_tokens_id` PRIMARY KEY(`id`),
	CONSTRAINT `api_tokens_token_uq` UNIQUE(`token_hash`)
);
--> statement-breakpoint
CREATE TABLE `bars_references` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`team_id` bigint unsigned NOT NULL,
	`production_id` bigint unsigned NOT NULL,
	`frame_id` bigint unsigned NOT NULL,
	`set_by` bigint unsigned,
	`created_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3) ON UPDATE CURRENT_TIMESTAMP,
	CONSTRAINT `bars_references_id` PRIMARY KEY(`id`),
	CONSTRAINT `bars_references_production_uq` UNIQUE(`production_id`)
);
--> statement-breakpoint
CREATE TABLE `clip_chunks` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`clip_id` bigint unsigned NOT NULL,
	`team_id` bigint unsigned NOT NULL,
	`idx` int NOT NULL,
	`start_frame` int NOT NULL,
	`frame_count` int NOT NULL,
	`frames_done` int NOT NULL DEFAULT 0,
	`measured` int,
	`error` varchar(500),
	`created_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3) ON UPDATE CURRENT_TIMESTAMP,
	CONSTRAINT `clip_chunks_id` PRIMARY KEY(`id`),
	CONSTRAINT `clip_chunks_clip_idx_uq` UNIQUE(`clip_id`,`idx`)
);
--> statement-breakpoint
CREATE TABLE `clip_events` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`clip_id` bigint unsigned NOT NULL,
	`team_id` bigint unsigned NOT NULL,
	`seq` int NOT NULL,
	`start_frame` int NOT NULL,
	`end_frame` int NOT NULL,
	`tc_in` varchar(16) NOT NULL,
	`tc_out` varchar(16) NOT NULL,
	`verdict` enum('caution','fail') NOT NULL,
	`limits` json NOT NULL,
	`worst_frame` int NOT NULL,
	`frame_id` bigint unsigned,
	`created_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3) ON UPDATE CURRENT_TIMESTAMP,
	CONSTRAINT `clip_events_id` PRIMARY KEY(`id`),
	CONSTRAINT `clip_events_clip_seq_uq` UNIQUE(`clip_id`,`seq`)
);
--> statement-breakpoint
CREATE TABLE `clip_frames` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`clip_id` bigint unsigned NOT NULL,
	`team_id` bigint unsigned NOT NULL,
	`frame_number` int NOT NULL,
	`frame_id` bigint unsigned NOT NULL,
	`kind` enum('event','filmstrip','asked') NOT NULL,
	`created_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3) ON UPDATE CURRENT_TIMESTAMP,
	CONSTRAINT `clip_frames_id` PRIMARY KEY(`id`),
	CONSTRAINT `clip_frames_clip_frame_uq` UNIQUE(`clip_id`,`frame_number`)
);
--> statement-breakpoint
CREATE TABLE `clips` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`team_id` bigint unsigned NOT NULL,
	`reel_id` bigint unsigned NOT NULL,
	`name` varchar(255) NOT NULL,
	`object_key` varchar(255) NOT NULL,
	`bytes` bigint unsigned NOT NULL,
	`multipart_id` varchar(255),
	`upload_expires_at` datetime,
	`status` enum('uploading','queued','probing','measuring','merging','done','failed','cancelled') NOT NULL DEFAULT 'uploading',
	`fail_reason` varchar(500),
	`probe` json,
	`width` int,
	`height` int,
	`fps_num` int,
	`fps_den` int,
	`drop_frame` boolean NOT NULL DEFAULT false,
	`start_timecode` varchar(16),
	`start_timecode_found` boolean NOT NULL DEFAULT false,
	`frame_count` int,
	`frames_measured` int,
	`truncated` boolean NOT NULL DEFAULT false,
	`note` varchar(500),
	`timeline_key` varchar(255),
	`spec_name` varchar(64),
	`spec_version` int,
	`engine_version` varchar(32),
	`measure_started_at` datetime(3),
	`measured_at` datetime(3),
	`queued_at` datetime(3),
	`uploaded_by` bigint unsigned,
	`created_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3) ON UPDATE CURRENT_TIMESTAMP,
	CONSTRAINT `clips_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `delivery_spec_versions` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`team_id` bigint unsigned NOT NULL,
	`spec_id` bigint unsigned NOT NULL,
	`version` int NOT NULL,
	`body` json NOT NULL,
	`changes` json NOT NULL,
	`rejudge` json,
	`created_by` bigint unsigned,
	`created_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `delivery_spec_versions_id` PRIMARY KEY(`id`),
	CONSTRAINT `delivery_spec_versions_uq` UNIQUE(`spec_id`,`version`)
);
--> statement-breakpoint
CREATE TABLE `sessions` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`user_id` bigint unsigned NOT NULL,
	`token_hash` char(64) NOT NULL,
	`user_agent` varchar(255) NOT NULL DEFAULT '',
	`expires_at` datetime NOT NULL,
	`revoked_at` datetime(3),
	`created_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3) ON UPDATE CURRENT_TIMESTAMP,
	CONSTRAINT `sessions_id` PRIMARY KEY(`id`),
	CONSTRAINT `sessions_token_uq` UNIQUE(`token_hash`)
);
--> statement-breakpoint
ALTER TABLE `analyses` ADD `matrix` enum('601','709');--> statement-breakpoint
ALTER TABLE `analyses` ADD `source_range` enum('full','studio');--> statement-breakpoint
ALTER TABLE `analyses` ADD `levels` json;--> statement-breakpoint
ALTER TABLE `decisions` ADD `recheck_at` datetime(3);--> statement-breakpoint
ALTER TABLE `decisions` ADD `recheck_note` varchar(300);--> statement-breakpoint
ALTER TABLE `reels` ADD `frame_rate` enum('24','25','30','50','60','23.976','29.97','59.94');--> statement-breakpoint
ALTER TABLE `reels` ADD `drop_frame` boolean DEFAULT false NOT NULL;--> statement-breakpoint
ALTER TABLE `uploads` ADD `claimed_at` datetime(3);--> statement-breakpoint
ALTER TABLE `uploads` ADD `frame_id` bigint unsigned;--> statement-breakpoint
ALTER TABLE `api_tokens` ADD CONSTRAINT `api_tokens_team_id_teams_id_fk` FOREIGN KEY (`team_id`) REFERENCES `teams`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `api_tokens` ADD CONSTRAINT `api_tokens_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `bars_references` ADD CONSTRAINT `bars_references_team_id_teams_id_fk` FOREIGN KEY (`team_id`) REFERENCES `teams`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `bars_references` ADD CONSTRAINT `bars_references_production_id_productions_id_fk` FOREIGN KEY (`production_id`) REFERENCES `productions`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `bars_references` ADD CONSTRAINT `bars_references_frame_id_frames_id_fk` FOREIGN KEY (`frame_id`) REFERENCES `frames`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `bars_references` ADD CONSTRAINT `bars_references_set_by_users_id_fk` FOREIGN KEY (`set_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `clip_chunks` ADD CONSTRAINT `clip_chunks_clip_id_clips_id_fk` FOREIGN KEY (`clip_id`) REFERENCES `clips`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `clip_chunks` ADD CONSTRAINT `clip_chunks_team_id_teams_id_fk` FOREIGN KEY (`team_id`) REFERENCES `teams`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `clip_events` ADD CONSTRAINT `clip_events_clip_id_clips_id_fk` FOREIGN KEY (`clip_id`) REFERENCES `clips`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `clip_events` ADD CONSTRAINT `clip_events_team_id_teams_id_fk` FOREIGN KEY (`team_id`) REFERENCES `teams`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `clip_events` ADD CONSTRAINT `clip_events_frame_id_frames_id_fk` FOREIGN KEY (`frame_id`) REFERENCES `frames`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `clip_frames` ADD CONSTRAINT `clip_frames_clip_id_clips_id_fk` FOREIGN KEY (`clip_id`) REFERENCES `clips`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `clip_frames` ADD CONSTRAINT `clip_frames_team_id_teams_id_fk` FOREIGN KEY (`team_id`) REFERENCES `teams`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `clip_frames` ADD CONSTRAINT `clip_frames_frame_id_frames_id_fk` FOREIGN KEY (`frame_id`) REFERENCES `frames`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `clips` ADD CONSTRAINT `clips_team_id_teams_id_fk` FOREIGN KEY (`team_id`) REFERENCES `teams`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `clips` ADD CONSTRAINT `clips_reel_id_reels_id_fk` FOREIGN KEY (`reel_id`) REFERENCES `reels`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `clips` ADD CONSTRAINT `clips_uploaded_by_users_id_fk` FOREIGN KEY (`uploaded_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `delivery_spec_versions` ADD CONSTRAINT `delivery_spec_versions_team_id_teams_id_fk` FOREIGN KEY (`team_id`) REFERENCES `teams`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `delivery_spec_versions` ADD CONSTRAINT `delivery_spec_versions_spec_id_delivery_specs_id_fk` FOREIGN KEY (`spec_id`) REFERENCES `delivery_specs`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `delivery_spec_versions` ADD CONSTRAINT `delivery_spec_versions_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `sessions` ADD CONSTRAINT `sessions_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `api_tokens_team_user_idx` ON `api_tokens` (`team_id`,`user_id`);--> statement-breakpoint
CREATE INDEX `bars_references_frame_idx` ON `bars_references` (`frame_id`);--> statement-breakpoint
CREATE INDEX `clip_events_frame_idx` ON `clip_events` (`frame_id`);--> statement-breakpoint
CREATE INDEX `clip_frames_frame_idx` ON `clip_frames` (`frame_id`);--> statement-breakpoint
CREATE INDEX `clips_reel_idx` ON `clips` (`reel_id`);--> statement-breakpoint
CREATE INDEX `clips_team_idx` ON `clips` (`team_id`);--> statement-breakpoint
CREATE INDEX `clips_status_idx` ON `clips` (`status`,`queued_at`);--> statement-breakpoint
CREATE INDEX `delivery_spec_versions_team_idx` ON `delivery_spec_versions` (`team_id`);--> statement-breakpoint
CREATE INDEX `sessions_user_idx` ON `sessions` (`user_id`,`revoked_at`);--> statement-breakpoint
CREATE INDEX `frames_object_key_idx` ON `frames` (`object_key`);