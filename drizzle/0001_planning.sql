CREATE TABLE `active_orbits` (
	`system` varchar(16) NOT NULL,
	`orbit_set_id` int,
	`enabled` boolean NOT NULL DEFAULT true,
	`updated_at` datetime(3) NOT NULL,
	CONSTRAINT `active_orbits_system` PRIMARY KEY(`system`)
);
--> statement-breakpoint
CREATE TABLE `calendar_tokens` (
	`id` int AUTO_INCREMENT NOT NULL,
	`farm_id` int NOT NULL,
	`token_hash` varchar(64) NOT NULL,
	`label` varchar(120) NOT NULL DEFAULT '',
	`include_windows` boolean NOT NULL DEFAULT false,
	`created_by` int,
	`created_at` datetime(3) NOT NULL,
	`revoked_at` datetime(3),
	CONSTRAINT `calendar_tokens_id` PRIMARY KEY(`id`),
	CONSTRAINT `calendar_tokens_hash_unique` UNIQUE(`token_hash`)
);
--> statement-breakpoint
CREATE TABLE `fields` (
	`id` int AUTO_INCREMENT NOT NULL,
	`farm_id` int NOT NULL,
	`name` varchar(120) NOT NULL,
	`crop` varchar(80) NOT NULL DEFAULT '',
	`notes` text NOT NULL,
	`service_level_id` int NOT NULL,
	`antenna_height_m` double NOT NULL,
	`boundary` mediumtext NOT NULL,
	`area_ha` double NOT NULL,
	`centroid_lat` double NOT NULL,
	`centroid_lon` double NOT NULL,
	`revision` int NOT NULL DEFAULT 1,
	`created_at` datetime(3) NOT NULL,
	`updated_at` datetime(3) NOT NULL,
	CONSTRAINT `fields_id` PRIMARY KEY(`id`),
	CONSTRAINT `fields_farm_name_unique` UNIQUE(`farm_id`,`name`)
);
--> statement-breakpoint
CREATE TABLE `forecast_hours` (
	`field_id` int NOT NULL,
	`hour_start` datetime(3) NOT NULL,
	`sats_min` smallint,
	`sats_median` double,
	`hdop_median` double,
	`hdop_max` double,
	`vdop_median` double,
	`vdop_max` double,
	`pdop_max` double,
	`n1_hdop_max` double,
	`h95_median_m` double,
	`h95_max_m` double,
	`v95_median_m` double,
	`v95_max_m` double,
	`no_fix_share` double NOT NULL DEFAULT 0,
	`work_json` text NOT NULL,
	`extra_json` text,
	`orbit_summary` varchar(255) NOT NULL DEFAULT '',
	`inputs_version` varchar(64) NOT NULL,
	`job_id` bigint,
	`computed_at` datetime(3) NOT NULL,
	CONSTRAINT `forecast_hours_field_id_hour_start_pk` PRIMARY KEY(`field_id`,`hour_start`)
);
--> statement-breakpoint
CREATE TABLE `jobs` (
	`id` bigint AUTO_INCREMENT NOT NULL,
	`kind` varchar(40) NOT NULL,
	`field_id` int,
	`farm_id` int,
	`dedupe_key` varchar(120),
	`inputs_version` varchar(64) NOT NULL DEFAULT '',
	`payload_json` mediumtext NOT NULL,
	`status` varchar(16) NOT NULL,
	`progress` double NOT NULL DEFAULT 0,
	`attempts` smallint NOT NULL DEFAULT 0,
	`max_attempts` smallint NOT NULL DEFAULT 4,
	`run_after` datetime(3) NOT NULL,
	`locked_by` varchar(80),
	`heartbeat_at` datetime(3),
	`started_at` datetime(3),
	`finished_at` datetime(3),
	`error` text,
	`result_json` text,
	`created_by` int,
	`created_at` datetime(3) NOT NULL,
	`updated_at` datetime(3) NOT NULL,
	CONSTRAINT `jobs_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `machines` (
	`id` int AUTO_INCREMENT NOT NULL,
	`name` varchar(120) NOT NULL,
	`crew` varchar(120) NOT NULL DEFAULT '',
	`antenna_height_m` double NOT NULL,
	`rate_ha_per_h` double,
	`active` boolean NOT NULL DEFAULT true,
	`notes` varchar(1000) NOT NULL DEFAULT '',
	`created_at` datetime(3) NOT NULL,
	`updated_at` datetime(3) NOT NULL,
	CONSTRAINT `machines_id` PRIMARY KEY(`id`),
	CONSTRAINT `machines_name_unique` UNIQUE(`name`)
);
--> statement-breakpoint
CREATE TABLE `obstructions` (
	`id` int AUTO_INCREMENT NOT NULL,
	`farm_id` int NOT NULL,
	`kind` varchar(16) NOT NULL,
	`height_m` double NOT NULL,
	`geometry` mediumtext NOT NULL,
	`leafless_from` varchar(5),
	`leafless_to` varchar(5),
	`note` varchar(1000) NOT NULL DEFAULT '',
	`created_at` datetime(3) NOT NULL,
	`updated_at` datetime(3) NOT NULL,
	CONSTRAINT `obstructions_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `orbit_satellites` (
	`orbit_set_id` int NOT NULL,
	`sat_id` varchar(32) NOT NULL,
	`name` varchar(80) NOT NULL DEFAULT '',
	`system` varchar(16) NOT NULL,
	`epoch` datetime(3) NOT NULL,
	CONSTRAINT `orbit_satellites_orbit_set_id_sat_id_pk` PRIMARY KEY(`orbit_set_id`,`sat_id`)
);
--> statement-breakpoint
CREATE TABLE `orbit_sets` (
	`id` int AUTO_INCREMENT NOT NULL,
	`name` varchar(160) NOT NULL,
	`source` varchar(16) NOT NULL,
	`format` varchar(16) NOT NULL,
	`content` mediumtext NOT NULL,
	`satellite_count` int NOT NULL,
	`skipped_count` int NOT NULL,
	`report_json` mediumtext NOT NULL,
	`oldest_epoch` datetime(3),
	`newest_epoch` datetime(3),
	`uploaded_by` int,
	`created_at` datetime(3) NOT NULL,
	CONSTRAINT `orbit_sets_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `outages` (
	`id` int AUTO_INCREMENT NOT NULL,
	`sat_id` varchar(32) NOT NULL,
	`from_at` datetime(3) NOT NULL,
	`to_at` datetime(3) NOT NULL,
	`note` varchar(1000) NOT NULL DEFAULT '',
	`created_by` int,
	`created_at` datetime(3) NOT NULL,
	`updated_at` datetime(3) NOT NULL,
	CONSTRAINT `outages_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `passes` (
	`id` int AUTO_INCREMENT NOT NULL,
	`field_id` int NOT NULL,
	`work_type_id` int NOT NULL,
	`machine_id` int,
	`start_at` datetime(3) NOT NULL,
	`duration_min` int NOT NULL,
	`status` varchar(16) NOT NULL,
	`at_risk` boolean NOT NULL DEFAULT false,
	`at_risk_reason` varchar(500),
	`suggested_start_at` datetime(3),
	`notes` text NOT NULL,
	`created_by` int,
	`created_at` datetime(3) NOT NULL,
	`updated_at` datetime(3) NOT NULL,
	CONSTRAINT `passes_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `plan_opt_outs` (
	`farm_id` int NOT NULL,
	`email` varchar(254) NOT NULL,
	`created_at` datetime(3) NOT NULL,
	CONSTRAINT `plan_opt_outs_farm_id_email_pk` PRIMARY KEY(`farm_id`,`email`)
);
--> statement-breakpoint
CREATE TABLE `plan_revisions` (
	`id` int AUTO_INCREMENT NOT NULL,
	`farm_id` int NOT NULL,
	`week_start` date NOT NULL,
	`revision` int NOT NULL,
	`note` text NOT NULL,
	`subject` varchar(300) NOT NULL,
	`html` mediumtext NOT NULL,
	`text_body` mediumtext NOT NULL,
	`ics` mediumtext NOT NULL,
	`created_by` int,
	`created_at` datetime(3) NOT NULL,
	CONSTRAINT `plan_revisions_id` PRIMARY KEY(`id`),
	CONSTRAINT `plan_revisions_unique` UNIQUE(`farm_id`,`week_start`,`revision`)
);
--> statement-breakpoint
CREATE TABLE `plan_schedules` (
	`farm_id` int NOT NULL,
	`enabled` boolean NOT NULL DEFAULT false,
	`weekday` smallint NOT NULL DEFAULT 1,
	`local_time` varchar(5) NOT NULL DEFAULT '07:00',
	`last_sent_week` varchar(10),
	`updated_at` datetime(3) NOT NULL,
	CONSTRAINT `plan_schedules_farm_id` PRIMARY KEY(`farm_id`)
);
--> statement-breakpoint
CREATE TABLE `plan_sends` (
	`id` int AUTO_INCREMENT NOT NULL,
	`revision_id` int NOT NULL,
	`recipient` varchar(254) NOT NULL,
	`user_id` int,
	`idempotency_key` varchar(200) NOT NULL,
	`status` varchar(16) NOT NULL,
	`message_id` varchar(255),
	`error` text,
	`attempts` smallint NOT NULL DEFAULT 0,
	`sent_by` int,
	`automatic` boolean NOT NULL DEFAULT false,
	`sent_at` datetime(3),
	`created_at` datetime(3) NOT NULL,
	`updated_at` datetime(3) NOT NULL,
	CONSTRAINT `plan_sends_id` PRIMARY KEY(`id`),
	CONSTRAINT `plan_sends_key_unique` UNIQUE(`idempotency_key`)
);
--> statement-breakpoint
CREATE TABLE `service_levels` (
	`id` int AUTO_INCREMENT NOT NULL,
	`name` varchar(80) NOT NULL,
	`sigma_uere_m` double NOT NULL,
	`note` varchar(500) NOT NULL DEFAULT '',
	`created_at` datetime(3) NOT NULL,
	`updated_at` datetime(3) NOT NULL,
	CONSTRAINT `service_levels_id` PRIMARY KEY(`id`),
	CONSTRAINT `service_levels_name_unique` UNIQUE(`name`)
);
--> statement-breakpoint
CREATE TABLE `work_types` (
	`id` int AUTO_INCREMENT NOT NULL,
	`name` varchar(80) NOT NULL,
	`service_level_id` int NOT NULL,
	`max_h95_m` double NOT NULL,
	`max_v95_m` double,
	`min_sats` smallint NOT NULL,
	`max_pdop` double NOT NULL,
	`required_share` double NOT NULL,
	`require_n1` boolean NOT NULL,
	`rate_ha_per_h` double NOT NULL,
	`sort_order` smallint NOT NULL DEFAULT 0,
	`active` boolean NOT NULL DEFAULT true,
	`created_at` datetime(3) NOT NULL,
	`updated_at` datetime(3) NOT NULL,
	CONSTRAINT `work_types_id` PRIMARY KEY(`id`),
	CONSTRAINT `work_types_name_unique` UNIQUE(`name`)
);
--> statement-breakpoint
ALTER TABLE `active_orbits` ADD CONSTRAINT `active_orbits_orbit_set_id_orbit_sets_id_fk` FOREIGN KEY (`orbit_set_id`) REFERENCES `orbit_sets`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `calendar_tokens` ADD CONSTRAINT `calendar_tokens_farm_id_farms_id_fk` FOREIGN KEY (`farm_id`) REFERENCES `farms`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `calendar_tokens` ADD CONSTRAINT `calendar_tokens_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `fields` ADD CONSTRAINT `fields_farm_id_farms_id_fk` FOREIGN KEY (`farm_id`) REFERENCES `farms`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `fields` ADD CONSTRAINT `fields_service_level_id_service_levels_id_fk` FOREIGN KEY (`service_level_id`) REFERENCES `service_levels`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `forecast_hours` ADD CONSTRAINT `forecast_hours_field_id_fields_id_fk` FOREIGN KEY (`field_id`) REFERENCES `fields`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `obstructions` ADD CONSTRAINT `obstructions_farm_id_farms_id_fk` FOREIGN KEY (`farm_id`) REFERENCES `farms`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `orbit_satellites` ADD CONSTRAINT `orbit_satellites_orbit_set_id_orbit_sets_id_fk` FOREIGN KEY (`orbit_set_id`) REFERENCES `orbit_sets`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `orbit_sets` ADD CONSTRAINT `orbit_sets_uploaded_by_users_id_fk` FOREIGN KEY (`uploaded_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `outages` ADD CONSTRAINT `outages_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `passes` ADD CONSTRAINT `passes_field_id_fields_id_fk` FOREIGN KEY (`field_id`) REFERENCES `fields`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `passes` ADD CONSTRAINT `passes_work_type_id_work_types_id_fk` FOREIGN KEY (`work_type_id`) REFERENCES `work_types`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `passes` ADD CONSTRAINT `passes_machine_id_machines_id_fk` FOREIGN KEY (`machine_id`) REFERENCES `machines`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `passes` ADD CONSTRAINT `passes_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `plan_opt_outs` ADD CONSTRAINT `plan_opt_outs_farm_id_farms_id_fk` FOREIGN KEY (`farm_id`) REFERENCES `farms`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `plan_revisions` ADD CONSTRAINT `plan_revisions_farm_id_farms_id_fk` FOREIGN KEY (`farm_id`) REFERENCES `farms`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `plan_revisions` ADD CONSTRAINT `plan_revisions_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `plan_schedules` ADD CONSTRAINT `plan_schedules_farm_id_farms_id_fk` FOREIGN KEY (`farm_id`) REFERENCES `farms`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `plan_sends` ADD CONSTRAINT `plan_sends_revision_id_plan_revisions_id_fk` FOREIGN KEY (`revision_id`) REFERENCES `plan_revisions`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `plan_sends` ADD CONSTRAINT `plan_sends_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `plan_sends` ADD CONSTRAINT `plan_sends_sent_by_users_id_fk` FOREIGN KEY (`sent_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `work_types` ADD CONSTRAINT `work_types_service_level_id_service_levels_id_fk` FOREIGN KEY (`service_level_id`) REFERENCES `service_levels`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `calendar_tokens_farm_idx` ON `calendar_tokens` (`farm_id`);--> statement-breakpoint
CREATE INDEX `fields_farm_idx` ON `fields` (`farm_id`);--> statement-breakpoint
CREATE INDEX `forecast_hours_hour_idx` ON `forecast_hours` (`hour_start`);--> statement-breakpoint
CREATE INDEX `jobs_claim_idx` ON `jobs` (`status`,`run_after`);--> statement-breakpoint
CREATE INDEX `jobs_dedupe_idx` ON `jobs` (`dedupe_key`,`status`);--> statement-breakpoint
CREATE INDEX `jobs_field_idx` ON `jobs` (`field_id`);--> statement-breakpoint
CREATE INDEX `obstructions_farm_idx` ON `obstructions` (`farm_id`);--> statement-breakpoint
CREATE INDEX `orbit_sets_created_idx` ON `orbit_sets` (`created_at`);--> statement-breakpoint
CREATE INDEX `outages_span_idx` ON `outages` (`from_at`,`to_at`);--> statement-breakpoint
CREATE INDEX `passes_field_idx` ON `passes` (`field_id`,`start_at`);--> statement-breakpoint
CREATE INDEX `passes_machine_idx` ON `passes` (`machine_id`,`start_at`);--> statement-breakpoint
CREATE INDEX `passes_start_idx` ON `passes` (`start_at`);--> statement-breakpoint
CREATE INDEX `plan_sends_revision_idx` ON `plan_sends` (`revision_id`);