-- Each bridge's inputs carry a version: a number from one sequence, new whenever a screening
-- input of the bridge changes (its geometry and loads, or any of its members' rows). A nightly
-- run that screens only what changed compares these versions with the ones its base run
-- screened, instead of reading and hashing every member of the fleet (seconds at 100,000
-- bridges, against milliseconds). A job records the version of the rows it loaded.
--
-- Names, places and dates are not inputs: changing them keeps the version. Members change
-- through statement-level triggers with transition tables, so an import of a whole file
-- touches each changed bridge once per statement, not once per member row.

CREATE SEQUENCE bridge_input_version;
-- Versions start from the clock (microseconds since 1970), not from 1: should this migration be
-- undone and applied again, the versions it hands out then lie above every earlier one, and
-- an earlier run's hash can never match a bridge whose inputs changed in between.
SELECT setval('bridge_input_version', (extract(epoch FROM clock_timestamp()) * 1000000)::bigint);

ALTER TABLE bridges ADD COLUMN input_version bigint NOT NULL DEFAULT nextval('bridge_input_version');

CREATE FUNCTION bridge_inputs_changed() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
    NEW.input_version := nextval('bridge_input_version');
    RETURN NEW;
END
$$;

CREATE TRIGGER bridges_input_version BEFORE UPDATE ON bridges FOR EACH ROW
WHEN ((OLD.truss_type, OLD.span_m, OLD.panels, OLD.depth_m, OLD.deck, OLD.end_posts, OLD.trusses,
       OLD.truss_share, OLD.tracks, OLD.dead_load_kn_per_m)
      IS DISTINCT FROM
      (NEW.truss_type, NEW.span_m, NEW.panels, NEW.depth_m, NEW.deck, NEW.end_posts, NEW.trusses,
       NEW.truss_share, NEW.tracks, NEW.dead_load_kn_per_m))
EXECUTE FUNCTION bridge_inputs_changed();

CREATE FUNCTION members_changed() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
    IF TG_OP = 'INSERT' THEN
        UPDATE bridges b SET input_version = nextval('bridge_input_version')
        WHERE b.bridge_id IN (SELECT bridge_id FROM new_rows);
    ELSIF TG_OP = 'DELETE' THEN
        UPDATE bridges b SET input_version = nextval('bridge_input_version')
        WHERE b.bridge_id IN (SELECT bridge_id FROM old_rows);
    ELSE
        UPDATE bridges b SET input_version = nextval('bridge_input_version')
        WHERE b.bridge_id IN (SELECT bridge_id FROM new_rows UNION SELECT bridge_id FROM old_rows);
    END IF;
    RETURN NULL;
END
$$;

CREATE TRIGGER members_inserted AFTER INSERT ON members
REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION members_changed();
CREATE TRIGGER members_updated AFTER UPDATE ON members
REFERENCING OLD TABLE AS old_rows NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION members_changed();
CREATE TRIGGER members_deleted AFTER DELETE ON members
REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION members_changed();

-- The reference trains of stored rating factors, read at the start of every run: an index
-- that a skip scan walks, one probe per distinct train, instead of reading every member.
CREATE INDEX members_reference_train ON members (reference_train) WHERE reference_train IS NOT NULL;

-- A run's picture, faster: a complete run's is its own rows (no recursion, no sort); an
-- incomplete run's is the newest row of each bridge among the incomplete runs of its chain
-- (small: what changed night by night), and the complete run the chain ends in for every
-- other bridge, found by a hashed anti-join instead of sorting the whole picture.
CREATE OR REPLACE FUNCTION run_picture(p_run bigint) RETURNS SETOF run_bridges
LANGUAGE plpgsql STABLE AS $$
BEGIN
    IF (SELECT complete FROM runs WHERE id = p_run) THEN
        RETURN QUERY SELECT b.* FROM run_bridges b WHERE b.run_id = p_run AND b.status <> 'removed';
        RETURN;
    END IF;
    RETURN QUERY
    WITH RECURSIVE chain (id, base, complete, depth) AS (
        SELECT r.id, r.base_run_id, r.complete, 0 FROM runs r WHERE r.id = p_run
        UNION ALL
        SELECT r.id, r.base_run_id, r.complete, c.depth + 1
        FROM chain c JOIN runs r ON r.id = c.base
        WHERE NOT c.complete
    ), deltas AS MATERIALIZED (
        SELECT DISTINCT ON (b.bridge_id) b
        FROM chain c JOIN run_bridges b ON b.run_id = c.id
        WHERE NOT c.complete
        ORDER BY b.bridge_id, c.depth
    )
    SELECT (d.b).* FROM deltas d WHERE (d.b).status <> 'removed'
    UNION ALL
    SELECT b.* FROM run_bridges b
    WHERE b.run_id = (SELECT c.id FROM chain c WHERE c.complete)
      AND b.status <> 'removed'
      AND NOT EXISTS (SELECT 1 FROM deltas d WHERE (d.b).bridge_id = b.bridge_id);
END
$$;

---- create above / drop below ----

CREATE OR REPLACE FUNCTION run_picture(p_run bigint) RETURNS SETOF run_bridges
LANGUAGE sql STABLE AS $$
    WITH RECURSIVE chain (id, base, complete, depth) AS (
        SELECT id, base_run_id, complete, 0 FROM runs WHERE id = p_run
        UNION ALL
        SELECT r.id, r.base_run_id, r.complete, c.depth + 1
        FROM chain c JOIN runs r ON r.id = c.base
        WHERE NOT c.complete
    )
    SELECT (p.b).* FROM (
        SELECT DISTINCT ON (b.bridge_id) b
        FROM chain c JOIN run_bridges b ON b.run_id = c.id
        ORDER BY b.bridge_id, c.depth
    ) p
    WHERE (p.b).status <> 'removed'
$$;
DROP INDEX members_reference_train;
DROP TRIGGER members_deleted ON members;
DROP TRIGGER members_updated ON members;
DROP TRIGGER members_inserted ON members;
DROP FUNCTION members_changed();
DROP TRIGGER bridges_input_version ON bridges;
DROP FUNCTION bridge_inputs_changed();
ALTER TABLE bridges DROP COLUMN input_version;
DROP SEQUENCE bridge_input_version;
