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
CREATE INDEX `jobs_field_idx` ON `jobs` (`field_id`,`status`);--> statement-breakpoint
INSERT INTO `field_forecasts` (`field_id`, `hours`, `first_hour`, `last_hour`, `min_version`, `max_version`, `computed_at`, `orbit_summary`, `max_job_id`)
SELECT `field_id`, COUNT(*), MIN(`hour_start`), MAX(`hour_start`), MIN(`inputs_version`), MAX(`inputs_version`), MAX(`computed_at`), MAX(`orbit_summary`), MAX(`job_id`)
FROM `forecast_hours` GROUP BY `field_id`;
