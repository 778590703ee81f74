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
ALTER TABLE `analyses` ADD `levels` json;--> statement-breakpoint
ALTER TABLE `decisions` ADD `recheck_at` datetime(3);--> statement-breakpoint
ALTER TABLE `decisions` ADD `recheck_note` varchar(300);--> statement-breakpoint
ALTER TABLE `delivery_spec_versions` ADD CONSTRAINT `delivery_spec_versions_team_id_teams_id_fk` FOREIGN KEY (`team_id`) REFERENCES `teams`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `delivery_spec_versions` ADD CONSTRAINT `delivery_spec_versions_spec_id_delivery_specs_id_fk` FOREIGN KEY (`spec_id`) REFERENCES `delivery_specs`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `delivery_spec_versions` ADD CONSTRAINT `delivery_spec_versions_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `delivery_spec_versions_team_idx` ON `delivery_spec_versions` (`team_id`);