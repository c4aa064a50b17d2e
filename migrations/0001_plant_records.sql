CREATE TYPE "public"."care_kind" AS ENUM('water', 'feed', 'repot', 'treat', 'move', 'damage', 'note');--> statement-breakpoint
CREATE TYPE "public"."damage_kind" AS ENUM('sunburn', 'cold', 'rot', 'mechanical', 'pest', 'other');--> statement-breakpoint
CREATE TYPE "public"."lead_status" AS ENUM('growing', 'mature', 'dried_off', 'rotted', 'removed');--> statement-breakpoint
CREATE TYPE "public"."sheath_state" AS ENUM('none', 'forming', 'empty', 'budded', 'dry');--> statement-breakpoint
CREATE TABLE "areas" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"collection_id" uuid NOT NULL,
	"name" text NOT NULL,
	"indoors" boolean DEFAULT false NOT NULL,
	"position" integer DEFAULT 0 NOT NULL,
	"notes" text,
	"version" integer DEFAULT 1 NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "bloom_records" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"collection_id" uuid NOT NULL,
	"lead_id" uuid NOT NULL,
	"buds_seen_on" date,
	"first_open_on" date,
	"last_faded_on" date,
	"flower_count" integer,
	"spike_count" integer,
	"note" text,
	"version" integer DEFAULT 1 NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "care_entries" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"collection_id" uuid NOT NULL,
	"plant_id" uuid,
	"area_id" uuid,
	"kind" "care_kind" NOT NULL,
	"occurred_on" date NOT NULL,
	"with_calcium" boolean,
	"new_medium" text,
	"product" text,
	"target" text,
	"to_area_id" uuid,
	"damage_kind" "damage_kind",
	"note" text,
	"created_by" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "care_entries_one_subject" CHECK (("care_entries"."plant_id" is null) <> ("care_entries"."area_id" is null))
);
--> statement-breakpoint
CREATE TABLE "leads" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"collection_id" uuid NOT NULL,
	"plant_id" uuid NOT NULL,
	"season" integer NOT NULL,
	"label" text NOT NULL,
	"first_seen" date NOT NULL,
	"parent_lead_id" uuid,
	"status" "lead_status" DEFAULT 'growing' NOT NULL,
	"from_back_bulb" boolean DEFAULT false NOT NULL,
	"version" integer DEFAULT 1 NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "leads_season_range" CHECK ("leads"."season" between 1900 and 2200)
);
--> statement-breakpoint
CREATE TABLE "measurements" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"collection_id" uuid NOT NULL,
	"lead_id" uuid NOT NULL,
	"measured_on" date NOT NULL,
	"height_mm" real NOT NULL,
	"leaf_count" integer,
	"sheath" "sheath_state" DEFAULT 'none' NOT NULL,
	"root_tips" integer,
	"bulb_width_mm" real,
	"note" text,
	"client_key" text,
	"created_by" text,
	"version" integer DEFAULT 1 NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "measurements_height_range" CHECK ("measurements"."height_mm" >= 0 and "measurements"."height_mm" <= 1500),
	CONSTRAINT "measurements_leaf_range" CHECK ("measurements"."leaf_count" is null or "measurements"."leaf_count" between 0 and 30)
);
--> statement-breakpoint
CREATE TABLE "plants" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"collection_id" uuid NOT NULL,
	"tag" text NOT NULL,
	"genus" text NOT NULL,
	"epithet" text NOT NULL,
	"is_species" boolean DEFAULT false NOT NULL,
	"clonal_name" text,
	"source" text,
	"acquired_on" date,
	"area_id" uuid,
	"medium" text,
	"notes" text,
	"parent_plant_id" uuid,
	"divided_on" date,
	"round_position" integer,
	"version" integer DEFAULT 1 NOT NULL,
	"created_by" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "plants_division_dated" CHECK (("plants"."parent_plant_id" is null) or ("plants"."divided_on" is not null))
);
--> statement-breakpoint
ALTER TABLE "areas" ADD CONSTRAINT "areas_collection_id_collections_id_fk" FOREIGN KEY ("collection_id") REFERENCES "public"."collections"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "bloom_records" ADD CONSTRAINT "bloom_records_collection_id_collections_id_fk" FOREIGN KEY ("collection_id") REFERENCES "public"."collections"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "bloom_records" ADD CONSTRAINT "bloom_records_lead_id_leads_id_fk" FOREIGN KEY ("lead_id") REFERENCES "public"."leads"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "care_entries" ADD CONSTRAINT "care_entries_collection_id_collections_id_fk" FOREIGN KEY ("collection_id") REFERENCES "public"."collections"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "care_entries" ADD CONSTRAINT "care_entries_plant_id_plants_id_fk" FOREIGN KEY ("plant_id") REFERENCES "public"."plants"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "care_entries" ADD CONSTRAINT "care_entries_area_id_areas_id_fk" FOREIGN KEY ("area_id") REFERENCES "public"."areas"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "care_entries" ADD CONSTRAINT "care_entries_to_area_id_areas_id_fk" FOREIGN KEY ("to_area_id") REFERENCES "public"."areas"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "care_entries" ADD CONSTRAINT "care_entries_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "leads" ADD CONSTRAINT "leads_collection_id_collections_id_fk" FOREIGN KEY ("collection_id") REFERENCES "public"."collections"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "leads" ADD CONSTRAINT "leads_plant_id_plants_id_fk" FOREIGN KEY ("plant_id") REFERENCES "public"."plants"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "leads" ADD CONSTRAINT "leads_parent_lead_id_leads_id_fk" FOREIGN KEY ("parent_lead_id") REFERENCES "public"."leads"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "measurements" ADD CONSTRAINT "measurements_collection_id_collections_id_fk" FOREIGN KEY ("collection_id") REFERENCES "public"."collections"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "measurements" ADD CONSTRAINT "measurements_lead_id_leads_id_fk" FOREIGN KEY ("lead_id") REFERENCES "public"."leads"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "measurements" ADD CONSTRAINT "measurements_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "plants" ADD CONSTRAINT "plants_collection_id_collections_id_fk" FOREIGN KEY ("collection_id") REFERENCES "public"."collections"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "plants" ADD CONSTRAINT "plants_area_id_areas_id_fk" FOREIGN KEY ("area_id") REFERENCES "public"."areas"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "plants" ADD CONSTRAINT "plants_parent_plant_id_plants_id_fk" FOREIGN KEY ("parent_plant_id") REFERENCES "public"."plants"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "plants" ADD CONSTRAINT "plants_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "areas_collection_name_unique" ON "areas" USING btree ("collection_id","name");--> statement-breakpoint
CREATE UNIQUE INDEX "bloom_records_lead_unique" ON "bloom_records" USING btree ("lead_id");--> statement-breakpoint
CREATE INDEX "care_entries_plant_idx" ON "care_entries" USING btree ("plant_id","occurred_on");--> statement-breakpoint
CREATE INDEX "care_entries_area_idx" ON "care_entries" USING btree ("area_id","occurred_on");--> statement-breakpoint
CREATE UNIQUE INDEX "leads_plant_label_unique" ON "leads" USING btree ("plant_id","label");--> statement-breakpoint
CREATE INDEX "leads_collection_idx" ON "leads" USING btree ("collection_id");--> statement-breakpoint
CREATE INDEX "measurements_lead_idx" ON "measurements" USING btree ("lead_id","measured_on");--> statement-breakpoint
CREATE UNIQUE INDEX "measurements_client_key_unique" ON "measurements" USING btree ("collection_id","client_key");--> statement-breakpoint
CREATE UNIQUE INDEX "plants_collection_tag_unique" ON "plants" USING btree ("collection_id","tag");--> statement-breakpoint
CREATE INDEX "plants_parent_idx" ON "plants" USING btree ("parent_plant_id");--> statement-breakpoint
CREATE INDEX "plants_area_idx" ON "plants" USING btree ("area_id");