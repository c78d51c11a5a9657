CREATE TABLE `elevation_model_chunks` (
	`model_id` int NOT NULL,
	`seq` int NOT NULL,
	`data` mediumblob NOT NULL,
	CONSTRAINT `elevation_model_chunks_model_id_seq_pk` PRIMARY KEY(`model_id`,`seq`)
);
--> statement-breakpoint
CREATE TABLE `elevation_models` (
	`id` int AUTO_INCREMENT NOT NULL,
	`farm_id` int NOT NULL,
	`file_name` varchar(255) NOT NULL,
	`format` varchar(16) NOT NULL,
	`crs` text NOT NULL,
	`crs_label` varchar(255) NOT NULL,
	`cols` int NOT NULL,
	`rows` int NOT NULL,
	`x0` double NOT NULL,
	`y0` double NOT NULL,
	`dx` double NOT NULL,
	`dy` double NOT NULL,
	`min_lon_deg` double NOT NULL,
	`min_lat_deg` double NOT NULL,
	`max_lon_deg` double NOT NULL,
	`max_lat_deg` double NOT NULL,
	`min_height_m` double,
	`max_height_m` double,
	`nodata_share` double NOT NULL,
	`content_sha` varchar(64) NOT NULL,
	`uploaded_by` int,
	`created_at` datetime(3) NOT NULL,
	CONSTRAINT `elevation_models_id` PRIMARY KEY(`id`),
	CONSTRAINT `elevation_models_farm_unique` UNIQUE(`farm_id`)
);
--> statement-breakpoint
ALTER TABLE `elevation_model_chunks` ADD CONSTRAINT `elevation_model_chunks_model_id_elevation_models_id_fk` FOREIGN KEY (`model_id`) REFERENCES `elevation_models`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `elevation_models` ADD CONSTRAINT `elevation_models_farm_id_farms_id_fk` FOREIGN KEY (`farm_id`) REFERENCES `farms`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `elevation_models` ADD CONSTRAINT `elevation_models_uploaded_by_users_id_fk` FOREIGN KEY (`uploaded_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `elevation_model_chunks_model_idx` ON `elevation_model_chunks` (`model_id`);