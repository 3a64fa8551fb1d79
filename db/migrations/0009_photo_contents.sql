CREATE TABLE "work_order_photo_contents" (
	"photo_id" integer PRIMARY KEY NOT NULL,
	"content" "bytea" NOT NULL
);
--> statement-breakpoint
ALTER TABLE "work_order_photo_contents" ADD CONSTRAINT "work_order_photo_contents_photo_id_work_order_photos_id_fk" FOREIGN KEY ("photo_id") REFERENCES "public"."work_order_photos"("id") ON DELETE cascade ON UPDATE no action;