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
ALTER TABLE `bars_references` ADD CONSTRAINT `bars_references_team_id_teams_id_fk` FOREIGN KEY (`team_id`) REFERENCES `teams`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `bars_references` ADD CONSTRAINT `bars_references_production_id_productions_id_fk` FOREIGN KEY (`production_id`) REFERENCES `productions`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `bars_references` ADD CONSTRAINT `bars_references_frame_id_frames_id_fk` FOREIGN KEY (`frame_id`) REFERENCES `frames`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `bars_references` ADD CONSTRAINT `bars_references_set_by_users_id_fk` FOREIGN KEY (`set_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `bars_references_frame_idx` ON `bars_references` (`frame_id`);