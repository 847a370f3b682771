-- Published and retired template versions are immutable snapshots (DESIGN.md §2: publishing
-- writes an immutable snapshot). Enforced here, below the application, so that no later draft
-- edit, bug or hand-written query can reach them:
--   * UPDATE of a published or retired row may change nothing of its snapshot (content, number,
--     template, revision, changelog, publication, derived counts); its state may only go
--     published → retired (with retired_at/retired_by/retired_reason);
--   * DELETE of a published or retired row is refused;
--   * a draft row is free (edited, and deleted when published).
CREATE OR REPLACE FUNCTION template_versions_immutable() RETURNS trigger
LANGUAGE plpgsql AS $$
BEGIN
  IF TG_OP = 'DELETE' THEN
    IF OLD.state <> 'draft' THEN
      RAISE EXCEPTION 'template version % (%) is % and cannot be deleted', OLD.number, OLD.id, OLD.state
        USING ERRCODE = 'integrity_constraint_violation';
    END IF;
    RETURN OLD;
  END IF;
  IF OLD.state = 'draft' THEN
    RETURN NEW;
  END IF;
  IF NEW.content IS DISTINCT FROM OLD.content
     OR NEW.number IS DISTINCT FROM OLD.number
     OR NEW.template_id IS DISTINCT FROM OLD.template_id
     OR NEW.revision IS DISTINCT FROM OLD.revision
     OR NEW.changelog IS DISTINCT FROM OLD.changelog
     OR NEW.published_at IS DISTINCT FROM OLD.published_at
     OR NEW.tube_types IS DISTINCT FROM OLD.tube_types
     OR NEW.stage_count IS DISTINCT FROM OLD.stage_count
     OR NEW.test_point_count IS DISTINCT FROM OLD.test_point_count
     OR NEW.component_count IS DISTINCT FROM OLD.component_count
     OR NOT (NEW.state = OLD.state OR (OLD.state = 'published' AND NEW.state = 'retired')) THEN
    RAISE EXCEPTION 'template version % (%) is % and its snapshot cannot change', OLD.number, OLD.id, OLD.state
      USING ERRCODE = 'integrity_constraint_violation';
  END IF;
  RETURN NEW;
END;
$$;
--> statement-breakpoint
CREATE TRIGGER template_versions_immutable
BEFORE UPDATE OR DELETE ON template_versions
FOR EACH ROW EXECUTE FUNCTION template_versions_immutable();
