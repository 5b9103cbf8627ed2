ALTER TABLE `edition_station_means` ADD `lat` real;--> statement-breakpoint
ALTER TABLE `edition_station_means` ADD `lon` real;--> statement-breakpoint
ALTER TABLE `edition_station_means` ADD `elevation_m` real;--> statement-breakpoint
ALTER TABLE `editions` ADD `withdrawn_at` integer;--> statement-breakpoint
ALTER TABLE `editions` ADD `withdrawn_reason` text;--> statement-breakpoint
ALTER TABLE `surfaces` ADD `model` text;