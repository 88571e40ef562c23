-- The released-batch guard of 0006, checked once per statement instead of once per row: the
-- row triggers ran one or two lookups for every curve and fit written (an upload of 1,000 curves
-- with their 2,000 fits: ~5,000 lookups embedded, ~9,000 with the job queue, whose workers write
-- each curve twice more). Statement triggers see the statement's rows as transition tables and
-- look the batches up in one query. Same rule and same refusal: a curve or fit of a released batch
-- is never inserted, changed or deleted (SQLSTATE QL409, answered 409 batch_released by
-- server/errors.ts); a batch that no longer exists (a cascade from deleting it) is not guarded.
-- AFTER statement triggers run at the end of the statement, inside it: the refusal undoes it.
DROP TRIGGER "curve_released_guard" ON "curve";
--> statement-breakpoint
DROP TRIGGER "fit_released_guard" ON "fit";
--> statement-breakpoint
DROP FUNCTION ql_curve_released_guard();
--> statement-breakpoint
DROP FUNCTION ql_fit_released_guard();
--> statement-breakpoint
DROP FUNCTION ql_refuse_released_batch(text);
--> statement-breakpoint
CREATE FUNCTION ql_refuse_released_batches(batch_ids text[]) RETURNS void LANGUAGE plpgsql AS $$
DECLARE
  released text;
BEGIN
  SELECT "id" INTO released FROM "batch" WHERE "id" = ANY (batch_ids) AND "state" = 'released' LIMIT 1;
  IF released IS NOT NULL THEN
    RAISE EXCEPTION 'batch % is released and read-only', released USING ERRCODE = 'QL409';
  END IF;
END $$;
--> statement-breakpoint
CREATE FUNCTION ql_curve_guard_new() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  PERFORM ql_refuse_released_batches(ARRAY(SELECT DISTINCT "batch_id" FROM new_rows));
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE FUNCTION ql_curve_guard_old() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  PERFORM ql_refuse_released_batches(ARRAY(SELECT DISTINCT "batch_id" FROM old_rows));
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE FUNCTION ql_curve_guard_changed() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  PERFORM ql_refuse_released_batches(ARRAY(SELECT "batch_id" FROM old_rows UNION SELECT "batch_id" FROM new_rows));
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE FUNCTION ql_fit_guard_new() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  PERFORM ql_refuse_released_batches(ARRAY(SELECT DISTINCT c."batch_id" FROM "curve" c WHERE c."id" IN (SELECT "curve_id" FROM new_rows)));
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE FUNCTION ql_fit_guard_old() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  PERFORM ql_refuse_released_batches(ARRAY(SELECT DISTINCT c."batch_id" FROM "curve" c WHERE c."id" IN (SELECT "curve_id" FROM old_rows)));
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE FUNCTION ql_fit_guard_changed() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  PERFORM ql_refuse_released_batches(ARRAY(SELECT DISTINCT c."batch_id" FROM "curve" c WHERE c."id" IN (SELECT "curve_id" FROM old_rows UNION SELECT "curve_id" FROM new_rows)));
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE TRIGGER "curve_released_guard_insert" AFTER INSERT ON "curve" REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION ql_curve_guard_new();
--> statement-breakpoint
CREATE TRIGGER "curve_released_guard_update" AFTER UPDATE ON "curve" REFERENCING OLD TABLE AS old_rows NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION ql_curve_guard_changed();
--> statement-breakpoint
CREATE TRIGGER "curve_released_guard_delete" AFTER DELETE ON "curve" REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION ql_curve_guard_old();
--> statement-breakpoint
CREATE TRIGGER "fit_released_guard_insert" AFTER INSERT ON "fit" REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION ql_fit_guard_new();
--> statement-breakpoint
CREATE TRIGGER "fit_released_guard_update" AFTER UPDATE ON "fit" REFERENCING OLD TABLE AS old_rows NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION ql_fit_guard_changed();
--> statement-breakpoint
CREATE TRIGGER "fit_released_guard_delete" AFTER DELETE ON "fit" REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION ql_fit_guard_old();
