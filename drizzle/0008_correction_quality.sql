CREATE TABLE `base_stations` (
	`id` int AUTO_INCREMENT NOT NULL,
	`name` varchar(120) NOT NULL,
	`lat_deg` double NOT NULL,
	`lon_deg` double NOT NULL,
	`antenna_height_m` double NOT NULL DEFAULT 0,
	`radio_range_km` double NOT NULL,
	`note` varchar(1000) NOT NULL DEFAULT '',
	`created_at` datetime(3) NOT NULL,
	`updated_at` datetime(3) NOT NULL,
	CONSTRAINT `base_stations_id` PRIMARY KEY(`id`),
	CONSTRAINT `base_stations_name_unique` UNIQUE(`name`)
);
--> statement-breakpoint
CREATE TABLE `correction_networks` (
	`id` int AUTO_INCREMENT NOT NULL,
	`name` varchar(120) NOT NULL,
	`coverage` mediumtext,
	`mount_points_json` text NOT NULL,
	`note` varchar(1000) NOT NULL DEFAULT '',
	`created_at` datetime(3) NOT NULL,
	`updated_at` datetime(3) NOT NULL,
	CONSTRAINT `correction_networks_id` PRIMARY KEY(`id`),
	CONSTRAINT `correction_networks_name_unique` UNIQUE(`name`)
);
--> statement-breakpoint
CREATE TABLE `kp_blocks` (
	`block_start` datetime(3) NOT NULL,
	`block_end` datetime(3) NOT NULL,
	`kp` double NOT NULL,
	`observed` boolean NOT NULL DEFAULT false,
	`fetched_at` datetime(3) NOT NULL,
	CONSTRAINT `kp_blocks_block_start` PRIMARY KEY(`block_start`)
);
--> statement-breakpoint
CREATE TABLE `space_weather_feed` (
	`id` int NOT NULL,
	`url` varchar(1000) NOT NULL DEFAULT '',
	`last_attempt_at` datetime(3),
	`last_ok_at` datetime(3),
	`last_error` varchar(1000),
	CONSTRAINT `space_weather_feed_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
ALTER TABLE `fields` ADD `base_station_id` int;--> statement-breakpoint
ALTER TABLE `fields` ADD `network_id` int;--> statement-breakpoint
ALTER TABLE `service_levels` ADD `ppm_h` double DEFAULT 0 NOT NULL;--> statement-breakpoint
ALTER TABLE `service_levels` ADD `ppm_v` double DEFAULT 0 NOT NULL;--> statement-breakpoint
ALTER TABLE `service_levels` ADD `max_baseline_km` double;--> statement-breakpoint
ALTER TABLE `service_levels` ADD `needs_base` boolean DEFAULT false NOT NULL;--> statement-breakpoint
ALTER TABLE `work_types` ADD `storm_action` varchar(8) DEFAULT 'none' NOT NULL;--> statement-breakpoint
ALTER TABLE `fields` ADD CONSTRAINT `fields_base_station_id_base_stations_id_fk` FOREIGN KEY (`base_station_id`) REFERENCES `base_stations`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `fields` ADD CONSTRAINT `fields_network_id_correction_networks_id_fk` FOREIGN KEY (`network_id`) REFERENCES `correction_networks`(`id`) ON DELETE set null ON UPDATE no action;