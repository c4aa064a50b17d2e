CREATE TABLE "cold_night_alerts" (
	"collection_id" uuid NOT NULL,
	"night" date NOT NULL,
	"claimed_by" text NOT NULL,
	"claimed_at" timestamp with time zone DEFAULT now() NOT NULL,
	"sent" integer DEFAULT 0 NOT NULL,
	CONSTRAINT "cold_night_alerts_collection_id_night_pk" PRIMARY KEY("collection_id","night")
);
--> statement-breakpoint
CREATE TABLE "division_handoffs" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"collection_id" uuid NOT NULL,
	"plant_id" uuid NOT NULL,
	"recipient_email" text NOT NULL,
	"note" text,
	"token_hash" text NOT NULL,
	"sent_by" text,
	"expires_at" timestamp with time zone NOT NULL,
	"accepted_at" timestamp with time zone,
	"accepted_by" text,
	"accepted_collection_id" uuid,
	"accepted_plant_id" uuid,
	"revoked_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "import_mappings" (
	"collection_id" uuid NOT NULL,
	"header_key" text NOT NULL,
	"mapping" jsonb NOT NULL,
	"updated_by" text,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "import_mappings_collection_id_header_key_pk" PRIMARY KEY("collection_id","header_key")
);
--> statement-breakpoint
ALTER TABLE "plants" ADD COLUMN "min_night_temp_c" real;--> statement-breakpoint
ALTER TABLE "plants" ADD COLUMN "history_only" boolean DEFAULT false NOT NULL;--> statement-breakpoint
ALTER TABLE "plants" ADD COLUMN "given_away_on" date;--> statement-breakpoint
ALTER TABLE "plants" ADD COLUMN "given_to" text;--> statement-breakpoint
ALTER TABLE "plants" ADD COLUMN "received_from" text;--> statement-breakpoint
ALTER TABLE "cold_night_alerts" ADD CONSTRAINT "cold_night_alerts_collection_id_collections_id_fk" FOREIGN KEY ("collection_id") REFERENCES "public"."collections"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "division_handoffs" ADD CONSTRAINT "division_handoffs_collection_id_collections_id_fk" FOREIGN KEY ("collection_id") REFERENCES "public"."collections"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "division_handoffs" ADD CONSTRAINT "division_handoffs_plant_id_plants_id_fk" FOREIGN KEY ("plant_id") REFERENCES "public"."plants"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "division_handoffs" ADD CONSTRAINT "division_handoffs_sent_by_users_id_fk" FOREIGN KEY ("sent_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "division_handoffs" ADD CONSTRAINT "division_handoffs_accepted_by_users_id_fk" FOREIGN KEY ("accepted_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "division_handoffs" ADD CONSTRAINT "division_handoffs_accepted_collection_id_collections_id_fk" FOREIGN KEY ("accepted_collection_id") REFERENCES "public"."collections"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "division_handoffs" ADD CONSTRAINT "division_handoffs_accepted_plant_id_plants_id_fk" FOREIGN KEY ("accepted_plant_id") REFERENCES "public"."plants"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "import_mappings" ADD CONSTRAINT "import_mappings_collection_id_collections_id_fk" FOREIGN KEY ("collection_id") REFERENCES "public"."collections"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "import_mappings" ADD CONSTRAINT "import_mappings_updated_by_users_id_fk" FOREIGN KEY ("updated_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "division_handoffs_token_unique" ON "division_handoffs" USING btree ("token_hash");--> statement-breakpoint
CREATE INDEX "division_handoffs_collection_idx" ON "division_handoffs" USING btree ("collection_id");--> statement-breakpoint
CREATE INDEX "division_handoffs_plant_idx" ON "division_handoffs" USING btree ("plant_id");--> statement-breakpoint
ALTER TABLE "plants" ADD CONSTRAINT "plants_min_night_temp_range" CHECK ("plants"."min_night_temp_c" is null or "plants"."min_night_temp_c" between -20 and 35);