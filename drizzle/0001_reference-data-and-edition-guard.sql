-- Reference data: the roles. Visitors are not stored; they are the absence of a session.
INSERT INTO "roles" ("name", "rank", "description") VALUES
  ('contributor', 1, 'Owns a workspace; clones, edits, computes, uploads samples and submits proposals'),
  ('curator', 2, 'Reviews proposals, publishes and retracts editions'),
  ('admin', 3, 'Manages users, roles and invitations; reads the audit log; bulk import')
ON CONFLICT ("name") DO NOTHING;
--> statement-breakpoint
-- Published editions are immutable: no DELETE, and no UPDATE except recording a retraction once.
CREATE OR REPLACE FUNCTION ergoshelf_guard_edition() RETURNS trigger
LANGUAGE plpgsql AS $$
BEGIN
  IF TG_OP = 'DELETE' THEN
    RAISE EXCEPTION 'edition % of model % is published and cannot be deleted', OLD.number, OLD.model_id
      USING ERRCODE = 'integrity_constraint_violation';
  END IF;
  IF OLD.retracted_at IS NOT NULL THEN
    RAISE EXCEPTION 'edition % of model % is retracted and cannot be changed', OLD.number, OLD.model_id
      USING ERRCODE = 'integrity_constraint_violation';
  END IF;
  IF NEW.id IS DISTINCT FROM OLD.id
     OR NEW.model_id IS DISTINCT FROM OLD.model_id
     OR NEW.number IS DISTINCT FROM OLD.number
     OR NEW.params IS DISTINCT FROM OLD.params
     OR NEW.content_hash IS DISTINCT FROM OLD.content_hash
     OR NEW.figures IS DISTINCT FROM OLD.figures
     OR NEW.verification IS DISTINCT FROM OLD.verification
     OR NEW.engine_version IS DISTINCT FROM OLD.engine_version
     OR NEW.note IS DISTINCT FROM OLD.note
     OR NEW.published_at IS DISTINCT FROM OLD.published_at
     OR NEW.published_by IS DISTINCT FROM OLD.published_by THEN
    RAISE EXCEPTION 'edition % of model % is published and immutable; only a retraction may be recorded', OLD.number, OLD.model_id
      USING ERRCODE = 'integrity_constraint_violation';
  END IF;
  IF NEW.retracted_at IS NULL OR NEW.retraction_reason IS NULL OR length(trim(NEW.retraction_reason)) = 0 THEN
    RAISE EXCEPTION 'a retraction needs a time and a reason'
      USING ERRCODE = 'integrity_constraint_violation';
  END IF;
  RETURN NEW;
END;
$$;
--> statement-breakpoint
CREATE TRIGGER editions_immutable
  BEFORE UPDATE OR DELETE ON "editions"
  FOR EACH ROW EXECUTE FUNCTION ergoshelf_guard_edition();
--> statement-breakpoint
-- TRUNCATE would bypass the row trigger; it is refused unless the session says it is a test reset
-- (SET ergoshelf.allow_truncate = 'on'). This guards against accidents, not against the table owner.
CREATE OR REPLACE FUNCTION ergoshelf_refuse_truncate() RETURNS trigger
LANGUAGE plpgsql AS $$
BEGIN
  IF coalesce(current_setting('ergoshelf.allow_truncate', true), '') <> 'on' THEN
    RAISE EXCEPTION 'published editions cannot be truncated'
      USING ERRCODE = 'integrity_constraint_violation';
  END IF;
  RETURN NULL;
END;
$$;
--> statement-breakpoint
CREATE TRIGGER editions_no_truncate
  BEFORE TRUNCATE ON "editions"
  FOR EACH STATEMENT EXECUTE FUNCTION ergoshelf_refuse_truncate();
