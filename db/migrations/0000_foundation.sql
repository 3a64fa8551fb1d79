CREATE TYPE "public"."counter_kind" AS ENUM('belt', 'collector');--> statement-breakpoint
CREATE TYPE "public"."role" AS ENUM('admin', 'manager', 'crew', 'integrator');--> statement-breakpoint
CREATE TABLE "farms" (
	"id" serial PRIMARY KEY NOT NULL,
	"name" text NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "houses" (
	"id" serial PRIMARY KEY NOT NULL,
	"farm_id" integer NOT NULL,
	"name" text NOT NULL,
	"rows" integer NOT NULL,
	"tiers" integer NOT NULL,
	"timezone" text NOT NULL,
	"lights_on" text NOT NULL,
	"photoperiod_hours" real NOT NULL,
	"shortfall_threshold_pct" real DEFAULT 10 NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "houses_farm_name_unique" UNIQUE("farm_id","name")
);
--> statement-breakpoint
CREATE TABLE "sections" (
	"id" serial PRIMARY KEY NOT NULL,
	"house_id" integer NOT NULL,
	"row" integer NOT NULL,
	"tier" integer NOT NULL,
	"bird_count" integer,
	CONSTRAINT "sections_house_row_tier_unique" UNIQUE("house_id","row","tier")
);
--> statement-breakpoint
CREATE TABLE "counters" (
	"id" serial PRIMARY KEY NOT NULL,
	"farm_id" integer NOT NULL,
	"house_id" integer,
	"section_id" integer,
	"external_id" text NOT NULL,
	"kind" "counter_kind" NOT NULL,
	"active" boolean DEFAULT true NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "counters_farm_external_unique" UNIQUE("farm_id","external_id"),
	CONSTRAINT "counters_collector_has_no_section" CHECK ("counters"."kind" <> 'collector' OR "counters"."section_id" IS NULL)
);
--> statement-breakpoint
CREATE TABLE "flocks" (
	"id" serial PRIMARY KEY NOT NULL,
	"house_id" integer NOT NULL,
	"placed_on" date NOT NULL,
	"hens_housed" integer NOT NULL,
	"age_at_placement_weeks" integer NOT NULL,
	"breed" text DEFAULT '' NOT NULL,
	"ended_on" date
);
--> statement-breakpoint
CREATE TABLE "mortality" (
	"id" serial PRIMARY KEY NOT NULL,
	"flock_id" integer NOT NULL,
	"date" date NOT NULL,
	"dead" integer DEFAULT 0 NOT NULL,
	"culled" integer DEFAULT 0 NOT NULL,
	CONSTRAINT "mortality_flock_date_unique" UNIQUE("flock_id","date")
);
--> statement-breakpoint
CREATE TABLE "readings" (
	"farm_id" integer NOT NULL,
	"counter_id" integer NOT NULL,
	"ts" timestamp with time zone NOT NULL,
	"eggs" integer NOT NULL,
	CONSTRAINT "readings_pk" PRIMARY KEY("farm_id","counter_id","ts")
);
--> statement-breakpoint
CREATE TABLE "users" (
	"id" serial PRIMARY KEY NOT NULL,
	"email" text NOT NULL,
	"name" text NOT NULL,
	"password_hash" text NOT NULL,
	"disabled" boolean DEFAULT false NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "memberships" (
	"user_id" integer NOT NULL,
	"farm_id" integer NOT NULL,
	"role" "role" NOT NULL,
	CONSTRAINT "memberships_pk" PRIMARY KEY("user_id","farm_id")
);
--> statement-breakpoint
CREATE TABLE "audit_events" (
	"id" bigserial PRIMARY KEY NOT NULL,
	"farm_id" integer,
	"actor_user_id" integer,
	"action" text NOT NULL,
	"entity" text NOT NULL,
	"entity_id" text NOT NULL,
	"before" jsonb,
	"after" jsonb,
	"at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "houses" ADD CONSTRAINT "houses_farm_id_farms_id_fk" FOREIGN KEY ("farm_id") REFERENCES "public"."farms"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "sections" ADD CONSTRAINT "sections_house_id_houses_id_fk" FOREIGN KEY ("house_id") REFERENCES "public"."houses"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "counters" ADD CONSTRAINT "counters_farm_id_farms_id_fk" FOREIGN KEY ("farm_id") REFERENCES "public"."farms"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "counters" ADD CONSTRAINT "counters_house_id_houses_id_fk" FOREIGN KEY ("house_id") REFERENCES "public"."houses"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "counters" ADD CONSTRAINT "counters_section_id_sections_id_fk" FOREIGN KEY ("section_id") REFERENCES "public"."sections"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "flocks" ADD CONSTRAINT "flocks_house_id_houses_id_fk" FOREIGN KEY ("house_id") REFERENCES "public"."houses"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "mortality" ADD CONSTRAINT "mortality_flock_id_flocks_id_fk" FOREIGN KEY ("flock_id") REFERENCES "public"."flocks"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "readings" ADD CONSTRAINT "readings_farm_id_farms_id_fk" FOREIGN KEY ("farm_id") REFERENCES "public"."farms"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "readings" ADD CONSTRAINT "readings_counter_id_counters_id_fk" FOREIGN KEY ("counter_id") REFERENCES "public"."counters"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "memberships" ADD CONSTRAINT "memberships_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "memberships" ADD CONSTRAINT "memberships_farm_id_farms_id_fk" FOREIGN KEY ("farm_id") REFERENCES "public"."farms"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "audit_events" ADD CONSTRAINT "audit_events_farm_id_farms_id_fk" FOREIGN KEY ("farm_id") REFERENCES "public"."farms"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "audit_events" ADD CONSTRAINT "audit_events_actor_user_id_users_id_fk" FOREIGN KEY ("actor_user_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "houses_farm_idx" ON "houses" USING btree ("farm_id");--> statement-breakpoint
CREATE INDEX "counters_house_idx" ON "counters" USING btree ("house_id");--> statement-breakpoint
CREATE INDEX "flocks_house_idx" ON "flocks" USING btree ("house_id");--> statement-breakpoint
CREATE UNIQUE INDEX "users_email_unique" ON "users" USING btree (lower("email"));--> statement-breakpoint
CREATE INDEX "memberships_farm_idx" ON "memberships" USING btree ("farm_id");--> statement-breakpoint
CREATE INDEX "audit_events_farm_at_idx" ON "audit_events" USING btree ("farm_id","at");