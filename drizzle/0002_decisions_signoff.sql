CREATE TABLE `decisions` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`frame_id` bigint unsigned NOT NULL,
	`team_id` bigint unsigned NOT NULL,
	`decision` enum('accepted','rejected','waived') NOT NULL,
	`note` varchar(1000) NOT NULL DEFAULT '',
	`decided_by` bigint unsigned,
	`created_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3) ON UPDATE CURRENT_TIMESTAMP,
	CONSTRAINT `decisions_id` PRIMARY KEY(`id`),
	CONSTRAINT `decisions_frame_uq` UNIQUE(`frame_id`)
);
--> statement-breakpoint
ALTER TABLE `reels` ADD `signed_at` datetime(3);--> statement-breakpoint
ALTER TABLE `reels` ADD `signed_by` bigint unsigned;--> statement-breakpoint
ALTER TABLE `decisions` ADD CONSTRAINT `decisions_frame_id_frames_id_fk` FOREIGN KEY (`frame_id`) REFERENCES `frames`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `decisions` ADD CONSTRAINT `decisions_team_id_teams_id_fk` FOREIGN KEY (`team_id`) REFERENCES `teams`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `decisions` ADD CONSTRAINT `decisions_decided_by_users_id_fk` FOREIGN KEY (`decided_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `decisions_team_idx` ON `decisions` (`team_id`);--> statement-breakpoint
ALTER TABLE `reels` ADD CONSTRAINT `reels_signed_by_users_id_fk` FOREIGN KEY (`signed_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;