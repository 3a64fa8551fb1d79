CREATE TABLE "import_file_chunks" (
	"stored_name" text NOT NULL,
	"seq" integer NOT NULL,
	"data" "bytea" NOT NULL,
	CONSTRAINT "import_file_chunks_stored_name_seq_pk" PRIMARY KEY("stored_name","seq")
);
