-- A released batch is final: the database itself refuses to insert, change or delete a curve of
-- it or a fit of such a curve, whatever code path tries. The server checks the state first under
-- a row lock and answers 409; this is the backstop. SQLSTATE QL409 is mapped to
-- 409 { code: "batch_released" } by server/errors.ts. A batch that no longer exists (a cascade
-- from deleting the batch or its organisation) is not guarded.
CREATE FUNCTION ql_refuse_released_batch(target_batch text) RETURNS void LANGUAGE plpgsql AS $$
BEGIN
  IF target_batch IS NOT NULL AND EXISTS (SELECT 1 FROM "batch" WHERE "id" = target_batch AND "state" = 'released') THEN
    RAISE EXCEPTION 'batch % is released and read-only', target_batch USING ERRCODE = 'QL409';
  END IF;
END $$;
--> statement-breakpoint
CREATE FUNCTION ql_curve_released_guard() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF TG_OP IN ('UPDATE', 'DELETE') THEN
    PERFORM ql_refuse_released_batch(OLD."batch_id");
  END IF;
  IF TG_OP IN ('INSERT', 'UPDATE') THEN
    PERFORM ql_refuse_released_batch(NEW."batch_id");
    RETURN NEW;
  END IF;
  RETURN OLD;
END $$;
--> statement-breakpoint
CREATE FUNCTION ql_fit_released_guard() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF TG_OP IN ('UPDATE', 'DELETE') THEN
    PERFORM ql_refuse_released_batch((SELECT "batch_id" FROM "curve" WHERE "id" = OLD."curve_id"));
  END IF;
  IF TG_OP IN ('INSERT', 'UPDATE') THEN
    PERFORM ql_refuse_released_batch((SELECT "batch_id" FROM "curve" WHERE "id" = NEW."curve_id"));
    RETURN NEW;
  END IF;
  RETURN OLD;
END $$;
--> statement-breakpoint
CREATE TRIGGER "curve_released_guard" BEFORE INSERT OR UPDATE OR DELETE ON "curve" FOR EACH ROW EXECUTE FUNCTION ql_curve_released_guard();
--> statement-breakpoint
CREATE TRIGGER "fit_released_guard" BEFORE INSERT OR UPDATE OR DELETE ON "fit" FOR EACH ROW EXECUTE FUNCTION ql_fit_released_guard();
--> statement-breakpoint
-- A release record is what was shipped: it is never rewritten (deleting the batch still removes it).
CREATE FUNCTION ql_release_immutable() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  RAISE EXCEPTION 'release records are never changed' USING ERRCODE = 'QL409';
END $$;
--> statement-breakpoint
CREATE TRIGGER "batch_release_immutable" BEFORE UPDATE ON "batch_release" FOR EACH ROW EXECUTE FUNCTION ql_release_immutable();
