ALTER TABLE `machines` ADD `operator_user_id` int;--> statement-breakpoint
ALTER TABLE `passes` ADD `status_changed_at` datetime(3);--> statement-breakpoint
ALTER TABLE `passes` ADD `status_changed_by` int;--> statement-breakpoint
ALTER TABLE `passes` ADD `version` int DEFAULT 1 NOT NULL;--> statement-breakpoint
ALTER TABLE `machines` ADD CONSTRAINT `machines_operator_user_id_users_id_fk` FOREIGN KEY (`operator_user_id`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `passes` ADD CONSTRAINT `passes_status_changed_by_users_id_fk` FOREIGN KEY (`status_changed_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;