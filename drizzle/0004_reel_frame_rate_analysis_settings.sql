ALTER TABLE `analyses` ADD `matrix` enum('601','709');--> statement-breakpoint
ALTER TABLE `analyses` ADD `source_range` enum('full','studio');--> statement-breakpoint
ALTER TABLE `reels` ADD `frame_rate` enum('24','25','30','50','60','23.976','29.97','59.94');--> statement-breakpoint
ALTER TABLE `reels` ADD `drop_frame` boolean DEFAULT false NOT NULL;