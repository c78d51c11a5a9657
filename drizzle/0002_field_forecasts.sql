CREATE TABLE `field_forecasts` (
	`field_id` int NOT NULL,
	`hours` int NOT NULL,
	`first_hour` datetime(3) NOT NULL,
	`last_hour` datetime(3) NOT NULL,
	`min_version` varchar(64) NOT NULL,
	`max_version` varchar(64) NOT NULL,
	`computed_at` datetime(3) NOT NULL,
	`orbit_summary` varchar(255) NOT NULL DEFAULT '',
	`max_job_id` bigint,
	CONSTRAINT `field_forecasts_field_id` PRIMARY KEY(`field_id`)
);
--> statement-breakpoint
DROP INDEX `jobs_field_idx` ON `jobs`;--> statement-breakpoint
ALTER TABLE `field_forecasts` ADD CONSTRAINT `field_forecasts_field_id_fields_id_fk` FOREIGN KEY (`field_id`) REFERENCES `fields`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `jobs_field_idx` ON `jobs` (`field_id`,`status`);