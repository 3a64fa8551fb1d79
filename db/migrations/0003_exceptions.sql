CREATE TYPE "public"."close_reason" AS ENUM('recovered', 'normal_for_spot', 'fixed', 'false_alarm', 'other');--> statement-breakpoint
CREATE TYPE "public"."exception_kind" AS ENUM('shortfall', 'silent_counter', 'collector_gap', 'house_dip');--> statement-breakpoint
CREATE TYPE "public"."exception_scope" AS ENUM('section', 'row', 'tier', 'house');--> statement-breakpoint
CREATE TYPE "public"."exception_status" AS ENUM('open', 'acknowledged', 'closed');--> statement-breakpoint
CREATE TABLE "exceptions" (
	"farm_id" integer NOT NULL,
	"id" bigserial NOT NULL,
	"house_id" integer NOT NULL,
	"kind" "exception_kind" NOT NULL,
	"scope" "exception_scope" NOT NULL,
	"row" integer,
	"tier" integer,
	"status" "exception_status" DEFAULT 'open' NOT NULL,
	"is_learning" boolean DEFAULT false NOT NULL,
	"opened_at" timestamp with time zone NOT NULL,
	"opened_day" date NOT NULL,
	"eggs" integer NOT NULL,
	"expected" real NOT NULL,
	"ratio" real NOT NULL,
	"p_value" double precision NOT NULL,
	"worst_ratio" real NOT NULL,
	"at_open" jsonb NOT NULL,
	"eggs_lost" integer DEFAULT 0 NOT NULL,
	"lost_by_day" jsonb DEFAULT '{}'::jsonb NOT NULL,
	"last_evaluated_at" timestamp with time zone NOT NULL,
	"acknowledged_at" timestamp with time zone,
	"acknowledged_by" integer,
	"closed_at" timestamp with time zone,
	"closed_by" integer,
	"close_reason" "close_reason",
	"close_note" text,
	CONSTRAINT "exceptions_pk" PRIMARY KEY("farm_id","id")
);
--> statement-breakpoint
CREATE TABLE "house_evaluations" (
	"house_id" integer PRIMARY KEY NOT NULL,
	"streaks" jsonb NOT NULL,
	"evaluated_at" timestamp with time zone NOT NULL
);
--> statement-breakpoint
ALTER TABLE "houses" ADD COLUMN "egg_price_per_dozen" real;--> statement-breakpoint
ALTER TABLE "exceptions" ADD CONSTRAINT "exceptions_farm_id_farms_id_fk" FOREIGN KEY ("farm_id") REFERENCES "public"."farms"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "exceptions" ADD CONSTRAINT "exceptions_house_id_houses_id_fk" FOREIGN KEY ("house_id") REFERENCES "public"."houses"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "exceptions" ADD CONSTRAINT "exceptions_acknowledged_by_users_id_fk" FOREIGN KEY ("acknowledged_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "exceptions" ADD CONSTRAINT "exceptions_closed_by_users_id_fk" FOREIGN KEY ("closed_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "house_evaluations" ADD CONSTRAINT "house_evaluations_house_id_houses_id_fk" FOREIGN KEY ("house_id") REFERENCES "public"."houses"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "exceptions_house_opened_idx" ON "exceptions" USING btree ("house_id","opened_at");--> statement-breakpoint
CREATE UNIQUE INDEX "exceptions_one_live_per_spot" ON "exceptions" USING btree ("house_id","kind","scope",coalesce("row", 0),coalesce("tier", 0)) WHERE "exceptions"."status" <> 'closed';--> statement-breakpoint
CREATE UNIQUE INDEX "exceptions_spot_opened_unique" ON "exceptions" USING btree ("house_id","kind","scope",coalesce("row", 0),coalesce("tier", 0),"opened_at");