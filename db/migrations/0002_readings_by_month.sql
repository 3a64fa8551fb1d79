-- Raw readings partitioned by month (UTC) on ts, so that old months can be dropped whole by the
-- retention job while the rollups stay. drizzle-kit cannot express partitioning, hence this hand-written
-- migration. The table holds no rows yet (ingest arrives with this migration), so it is recreated.
-- No foreign keys on it: see docs/adr/0003.
DROP TABLE "readings";
--> statement-breakpoint
CREATE TABLE "readings" (
	"farm_id" integer NOT NULL,
	"counter_id" integer NOT NULL,
	"ts" timestamp with time zone NOT NULL,
	"eggs" integer NOT NULL,
	"total" integer,
	CONSTRAINT "readings_pk" PRIMARY KEY("farm_id","counter_id","ts")
) PARTITION BY RANGE ("ts");
--> statement-breakpoint
-- Creates the month's partition when it is missing; safe to call concurrently and often.
CREATE FUNCTION ensure_readings_partition(p_month date) RETURNS void LANGUAGE plpgsql AS $$
DECLARE
	month_start date := date_trunc('month', p_month)::date;
	partition_name text := format('readings_%s', to_char(month_start, 'YYYY_MM'));
BEGIN
	IF to_regclass(partition_name) IS NOT NULL THEN
		RETURN;
	END IF;
	PERFORM pg_advisory_xact_lock(hashtext('tierscope.readings_partitions'));
	IF to_regclass(partition_name) IS NOT NULL THEN
		RETURN;
	END IF;
	EXECUTE format(
		'CREATE TABLE %I PARTITION OF readings FOR VALUES FROM (%L) TO (%L)',
		partition_name,
		month_start::timestamp AT TIME ZONE 'UTC',
		(month_start + interval '1 month')::timestamp AT TIME ZONE 'UTC'
	);
END;
$$;
--> statement-breakpoint
-- Drops the partitions of months that end on or before p_before; returns their names.
CREATE FUNCTION drop_readings_partitions_before(p_before date) RETURNS SETOF text LANGUAGE plpgsql AS $$
DECLARE
	part record;
BEGIN
	FOR part IN
		SELECT c.relname
		FROM pg_inherits i
		JOIN pg_class c ON c.oid = i.inhrelid
		WHERE i.inhparent = 'readings'::regclass
			AND c.relname ~ '^readings_\d{4}_\d{2}$'
			AND (to_date(substr(c.relname, 10), 'YYYY_MM') + interval '1 month')::date <= p_before
		ORDER BY c.relname
	LOOP
		EXECUTE format('DROP TABLE %I', part.relname);
		RETURN NEXT part.relname;
	END LOOP;
END;
$$;
--> statement-breakpoint
SELECT ensure_readings_partition((date_trunc('month', now()) + make_interval(months => m))::date)
FROM generate_series(-2, 3) AS m;
