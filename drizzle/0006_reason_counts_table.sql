CREATE TABLE `reason_counts` (
	`code` text PRIMARY KEY NOT NULL,
	`n` integer DEFAULT 0 NOT NULL
);
