-- Truss forms of older fleets (docs/inventory.md, "Truss forms"): a polygonal top chord
-- given as a list of depths or by its end depth (a parabola to the midspan depth), trusses
-- continuous over two or three equal spans, and trusses given as a joint/member table.
--
-- The new geometry columns are screening inputs: a trigger of their own renews a bridge's
-- input_version (migration 010) when they change, and so does a change of its joint table.


ALTER TABLE bridges
    -- Depth at every top-chord joint, left to right, m; NULL: parallel chords or a parabola.
    ADD COLUMN depths_m double precision[] CHECK (0 < ALL (depths_m)),
    -- Depth at the first and last top-chord joints of a parabolic top chord, m; 0: none.
    ADD COLUMN end_depth_m double precision NOT NULL DEFAULT 0 CHECK (end_depth_m >= 0),
    -- Number of equal spans over which the truss is continuous.
    ADD COLUMN spans integer NOT NULL DEFAULT 1 CHECK (spans BETWEEN 1 AND 3);

-- A truss given as a table: one row per bridge, the table (joints, members, supports, deck
-- joints in order) as the importer checked it, SI units, as JSON.
CREATE TABLE truss_tables (
    bridge_id  text PRIMARY KEY REFERENCES bridges (bridge_id) ON DELETE CASCADE,
    doc        jsonb NOT NULL,
    import_batch_id bigint REFERENCES import_batches (id),
    updated_at timestamptz NOT NULL DEFAULT now()
);

ALTER TABLE import_batches DROP CONSTRAINT import_batches_kind_check;
ALTER TABLE import_batches ADD CONSTRAINT import_batches_kind_check
    CHECK (kind IN ('bridges', 'members', 'trains', 'trusses'));

-- A trigger of its own, beside the one that watches the other geometry columns.
CREATE TRIGGER bridges_forms_input_version BEFORE UPDATE ON bridges FOR EACH ROW
WHEN ((OLD.depths_m, OLD.end_depth_m, OLD.spans) IS DISTINCT FROM (NEW.depths_m, NEW.end_depth_m, NEW.spans))
EXECUTE FUNCTION bridge_inputs_changed();

CREATE FUNCTION truss_tables_changed() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
    IF TG_OP IN ('UPDATE', 'DELETE') THEN
        UPDATE bridges SET input_version = nextval('bridge_input_version') WHERE bridge_id = OLD.bridge_id;
    END IF;
    IF TG_OP IN ('INSERT', 'UPDATE') THEN
        UPDATE bridges SET input_version = nextval('bridge_input_version') WHERE bridge_id = NEW.bridge_id;
    END IF;
    RETURN NULL;
END
$$;
CREATE TRIGGER truss_tables_changed AFTER INSERT OR DELETE OR UPDATE OF doc ON truss_tables
FOR EACH ROW EXECUTE FUNCTION truss_tables_changed();

---- create above / drop below ----

DROP TRIGGER truss_tables_changed ON truss_tables;
DROP FUNCTION truss_tables_changed();
DROP TABLE truss_tables;
DELETE FROM import_batches WHERE kind = 'trusses';
ALTER TABLE import_batches DROP CONSTRAINT import_batches_kind_check;
ALTER TABLE import_batches ADD CONSTRAINT import_batches_kind_check
    CHECK (kind IN ('bridges', 'members', 'trains'));
DROP TRIGGER bridges_forms_input_version ON bridges;
ALTER TABLE bridges DROP COLUMN spans, DROP COLUMN end_depth_m, DROP COLUMN depths_m;
