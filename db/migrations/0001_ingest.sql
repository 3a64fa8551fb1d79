CREATE TABLE "gateways" (
	"id" serial PRIMARY KEY NOT NULL,
	"farm_id" integer NOT NULL,
	"name" text NOT NULL,
	"key_hash" text NOT NULL,
	"key_prefix" text NOT NULL,
	"created_by" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"revoked_at" timestamp with time zone,
	"last_used_at" timestamp with time zone
);
--> statement-breakpoint
CREATE TABLE "collector_day_rollups" (
	"farm_id" integer NOT NULL,
	"house_id" integer NOT NULL,
	"day" date NOT NULL,
	"eggs" integer NOT NULL,
	CONSTRAINT "collector_day_rollups_pk" PRIMARY KEY("farm_id","house_id","day")
);
--> statement-breakpoint
CREATE TABLE "counter_hour_rollups" (
	"farm_id" integer NOT NULL,
	"counter_id" integer NOT NULL,
	"hour" timestamp with time zone NOT NULL,
	"eggs" integer NOT NULL,
	CONSTRAINT "counter_hour_rollups_pk" PRIMARY KEY("farm_id","counter_id","hour")
);
--> statement-breakpoint
CREATE TABLE "section_day_rollups" (
	"farm_id" integer NOT NULL,
	"section_id" integer NOT NULL,
	"day" date NOT NULL,
	"eggs" integer NOT NULL,
	CONSTRAINT "section_day_rollups_pk" PRIMARY KEY("farm_id","section_id","day")
);
--> statement-breakpoint
ALTER TABLE "readings" DROP CONSTRAINT "readings_farm_id_farms_id_fk";
--> statement-breakpoint
ALTER TABLE "readings" DROP CONSTRAINT "readings_counter_id_counters_id_fk";
--> statement-breakpoint
ALTER TABLE "readings" ADD COLUMN "total" integer;--> statement-breakpoint
ALTER TABLE "gateways" ADD CONSTRAINT "gateways_farm_id_farms_id_fk" FOREIGN KEY ("farm_id") REFERENCES "public"."farms"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "gateways" ADD CONSTRAINT "gateways_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "collector_day_rollups" ADD CONSTRAINT "collector_day_rollups_farm_id_farms_id_fk" FOREIGN KEY ("farm_id") REFERENCES "public"."farms"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "collector_day_rollups" ADD CONSTRAINT "collector_day_rollups_house_id_houses_id_fk" FOREIGN KEY ("house_id") REFERENCES "public"."houses"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "counter_hour_rollups" ADD CONSTRAINT "counter_hour_rollups_farm_id_farms_id_fk" FOREIGN KEY ("farm_id") REFERENCES "public"."farms"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "counter_hour_rollups" ADD CONSTRAINT "counter_hour_rollups_counter_id_counters_id_fk" FOREIGN KEY ("counter_id") REFERENCES "public"."counters"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "section_day_rollups" ADD CONSTRAINT "section_day_rollups_farm_id_farms_id_fk" FOREIGN KEY ("farm_id") REFERENCES "public"."farms"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "section_day_rollups" ADD CONSTRAINT "section_day_rollups_section_id_sections_id_fk" FOREIGN KEY ("section_id") REFERENCES "public"."sections"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "gateways_key_hash_unique" ON "gateways" USING btree ("key_hash");--> statement-breakpoint
CREATE INDEX "gateways_farm_idx" ON "gateways" USING btree ("farm_id");