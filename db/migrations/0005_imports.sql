CREATE TYPE "public"."import_state" AS ENUM('queued', 'running', 'done', 'failed', 'cancelled');--> statement-breakpoint
CREATE TABLE "import_errors" (
	"import_id" integer NOT NULL,
	"line" integer NOT NULL,
	"column" text,
	"message" text NOT NULL
);
--> statement-breakpoint
CREATE TABLE "import_mappings" (
	"id" serial PRIMARY KEY NOT NULL,
	"farm_id" integer NOT NULL,
	"name" text NOT NULL,
	"mapping" jsonb NOT NULL,
	"created_by" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "import_mappings_farm_name_unique" UNIQUE("farm_id","name")
);
--> statement-breakpoint
CREATE TABLE "imports" (
	"id" serial PRIMARY KEY NOT NULL,
	"farm_id" integer NOT NULL,
	"house_id" integer NOT NULL,
	"stored_name" text NOT NULL,
	"file_name" text NOT NULL,
	"bytes" bigint NOT NULL,
	"mapping" jsonb NOT NULL,
	"state" "import_state" DEFAULT 'queued' NOT NULL,
	"lines_read" integer DEFAULT 0 NOT NULL,
	"readings_added" integer DEFAULT 0 NOT NULL,
	"duplicates" integer DEFAULT 0 NOT NULL,
	"error_count" integer DEFAULT 0 NOT NULL,
	"bytes_read" bigint DEFAULT 0 NOT NULL,
	"first_ts" timestamp with time zone,
	"last_ts" timestamp with time zone,
	"message" text,
	"cancel_requested_at" timestamp with time zone,
	"created_by" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"started_at" timestamp with time zone,
	"finished_at" timestamp with time zone
);
--> statement-breakpoint
ALTER TABLE "import_errors" ADD CONSTRAINT "import_errors_import_id_imports_id_fk" FOREIGN KEY ("import_id") REFERENCES "public"."imports"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "import_mappings" ADD CONSTRAINT "import_mappings_farm_id_farms_id_fk" FOREIGN KEY ("farm_id") REFERENCES "public"."farms"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "import_mappings" ADD CONSTRAINT "import_mappings_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "imports" ADD CONSTRAINT "imports_farm_id_farms_id_fk" FOREIGN KEY ("farm_id") REFERENCES "public"."farms"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "imports" ADD CONSTRAINT "imports_house_id_houses_id_fk" FOREIGN KEY ("house_id") REFERENCES "public"."houses"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "imports" ADD CONSTRAINT "imports_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "import_errors_import_line_idx" ON "import_errors" USING btree ("import_id","line");--> statement-breakpoint
CREATE INDEX "imports_farm_created_idx" ON "imports" USING btree ("farm_id","created_at");--> statement-breakpoint
CREATE INDEX "imports_state_idx" ON "imports" USING btree ("state");