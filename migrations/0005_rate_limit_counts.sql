-- Databases started before this migration already have the table: the server used to create it on start.
CREATE TABLE IF NOT EXISTS "rate_limit_counts" (
	"key" varchar(255) PRIMARY KEY NOT NULL,
	"points" integer DEFAULT 0 NOT NULL,
	"expire" bigint
);
