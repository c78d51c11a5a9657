CREATE TABLE `audit_events` (
	`id` int AUTO_INCREMENT NOT NULL,
	`at` datetime(3) NOT NULL,
	`actor_id` int,
	`actor_name` varchar(120) NOT NULL,
	`action` varchar(40) NOT NULL,
	`target_type` varchar(20) NOT NULL,
	`target_id` int NOT NULL,
	`target_name` varchar(254) NOT NULL,
	`changes_json` text NOT NULL,
	CONSTRAINT `audit_events_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
ALTER TABLE `sessions` ADD `created_at` datetime(3);--> statement-breakpoint
ALTER TABLE `audit_events` ADD CONSTRAINT `audit_events_actor_id_users_id_fk` FOREIGN KEY (`actor_id`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `audit_at_idx` ON `audit_events` (`at`);--> statement-breakpoint
CREATE INDEX `audit_target_idx` ON `audit_events` (`target_type`,`target_id`);