CREATE TABLE `auth_tokens` (
	`id` int AUTO_INCREMENT NOT NULL,
	`user_id` int NOT NULL,
	`purpose` varchar(16) NOT NULL,
	`token_hash` varchar(64) NOT NULL,
	`expires_at` datetime(3) NOT NULL,
	`used_at` datetime(3),
	`created_at` datetime(3) NOT NULL,
	CONSTRAINT `auth_tokens_id` PRIMARY KEY(`id`),
	CONSTRAINT `auth_tokens_hash_unique` UNIQUE(`token_hash`)
);
--> statement-breakpoint
CREATE TABLE `business` (
	`id` int NOT NULL,
	`name` varchar(160) NOT NULL,
	`created_at` datetime(3) NOT NULL,
	`updated_at` datetime(3) NOT NULL,
	CONSTRAINT `business_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `farm_clients` (
	`farm_id` int NOT NULL,
	`user_id` int NOT NULL,
	CONSTRAINT `farm_clients_farm_id_user_id_pk` PRIMARY KEY(`farm_id`,`user_id`)
);
--> statement-breakpoint
CREATE TABLE `farms` (
	`id` int AUTO_INCREMENT NOT NULL,
	`name` varchar(120) NOT NULL,
	`time_zone` varchar(64) NOT NULL,
	`address` varchar(500) NOT NULL DEFAULT '',
	`notes` text NOT NULL,
	`created_at` datetime(3) NOT NULL,
	`updated_at` datetime(3) NOT NULL,
	CONSTRAINT `farms_id` PRIMARY KEY(`id`),
	CONSTRAINT `farms_name_unique` UNIQUE(`name`)
);
--> statement-breakpoint
CREATE TABLE `mailbox_messages` (
	`id` int AUTO_INCREMENT NOT NULL,
	`message_id` varchar(255) NOT NULL DEFAULT '',
	`from_address` varchar(500) NOT NULL DEFAULT '',
	`to_addresses` text NOT NULL,
	`subject` varchar(500) NOT NULL DEFAULT '',
	`received_at` datetime(3) NOT NULL,
	`size_bytes` int NOT NULL,
	`has_attachments` boolean NOT NULL DEFAULT false,
	`attachments_json` text NOT NULL,
	`text_body` mediumtext NOT NULL,
	`html_body` mediumtext NOT NULL,
	`raw` longblob NOT NULL,
	CONSTRAINT `mailbox_messages_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `sessions` (
	`id` varchar(255) NOT NULL,
	`user_id` int NOT NULL,
	`expires_at` datetime(3) NOT NULL,
	CONSTRAINT `sessions_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `users` (
	`id` int AUTO_INCREMENT NOT NULL,
	`email` varchar(254) NOT NULL,
	`name` varchar(120) NOT NULL,
	`role` varchar(16) NOT NULL,
	`active` boolean NOT NULL DEFAULT true,
	`units` varchar(16) NOT NULL DEFAULT 'metric',
	`password_hash` varchar(255),
	`last_sign_in_at` datetime(3),
	`created_at` datetime(3) NOT NULL,
	`updated_at` datetime(3) NOT NULL,
	CONSTRAINT `users_id` PRIMARY KEY(`id`),
	CONSTRAINT `users_email_unique` UNIQUE(`email`)
);
--> statement-breakpoint
ALTER TABLE `auth_tokens` ADD CONSTRAINT `auth_tokens_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `farm_clients` ADD CONSTRAINT `farm_clients_farm_id_farms_id_fk` FOREIGN KEY (`farm_id`) REFERENCES `farms`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `farm_clients` ADD CONSTRAINT `farm_clients_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `sessions` ADD CONSTRAINT `sessions_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `auth_tokens_user_idx` ON `auth_tokens` (`user_id`);--> statement-breakpoint
CREATE INDEX `farm_clients_user_idx` ON `farm_clients` (`user_id`);--> statement-breakpoint
CREATE INDEX `mailbox_received_idx` ON `mailbox_messages` (`received_at`);--> statement-breakpoint
CREATE INDEX `sessions_user_idx` ON `sessions` (`user_id`);--> statement-breakpoint
CREATE INDEX `users_role_idx` ON `users` (`role`);