-- Results stored once per content. A bridge's member results and assessments form a result
-- set, stored once and referred to by every run whose bridge has exactly those results
-- (result_sets.digest: SHA-256 of the set's rows as the program writes them, set id left
-- out). A run's bridge row names its set (run_bridges.set_id).
--
-- A run that re-screens only changed bridges (mode 'changed') holds rows only for what
-- differs from its base run: the bridges it screens (pending, then done or failed) and the
-- bridges gone from the inventory since ('removed'). Its picture, one row a bridge, is its own
-- rows over its base run's picture (run_picture below); runs.complete marks a run whose own
-- rows are its whole picture (every full run, and every run from before this migration).
-- Pruning a run that another depends on first writes the pruned run's picture into the
-- dependent run (as 'carried' rows), which then becomes complete.
--
-- Existing results move over as one set per run and bridge (with a digest that no new set can
-- have, so new runs do not reuse them): old runs stay readable. On a large database this
-- rewrites every result row once.

CREATE TABLE result_sets (
    id          bigint GENERATED ALWAYS AS IDENTITY PRIMARY KEY,
    bridge_id   text        NOT NULL,
    digest      bytea       NOT NULL,
    created_at  timestamptz NOT NULL DEFAULT now(),
    UNIQUE (bridge_id, digest)
);

ALTER TABLE runs ADD COLUMN complete boolean NOT NULL DEFAULT true;

ALTER TABLE run_bridges ADD COLUMN set_id bigint;
ALTER TABLE run_bridges DROP CONSTRAINT run_bridges_status_check;
ALTER TABLE run_bridges ADD CONSTRAINT run_bridges_status_check
    CHECK (status IN ('pending', 'done', 'failed', 'carried', 'removed'));

-- One set per existing run and bridge with results.
CREATE TEMPORARY TABLE legacy_sets ON COMMIT DROP AS
    SELECT run_id, bridge_id FROM run_bridges WHERE status IN ('done', 'carried');
ALTER TABLE legacy_sets ADD COLUMN set_id bigint;
WITH made AS (
    INSERT INTO result_sets (bridge_id, digest)
    SELECT bridge_id, sha256(convert_to('legacy run ' || run_id || ' bridge ' || bridge_id, 'UTF8'))
    FROM legacy_sets
    RETURNING id, bridge_id, digest
)
UPDATE legacy_sets l SET set_id = m.id FROM made m
WHERE m.bridge_id = l.bridge_id
  AND m.digest = sha256(convert_to('legacy run ' || l.run_id || ' bridge ' || l.bridge_id, 'UTF8'));
UPDATE run_bridges r SET set_id = l.set_id FROM legacy_sets l
WHERE r.run_id = l.run_id AND r.bridge_id = l.bridge_id;

ALTER TABLE member_results RENAME TO member_results_old;
ALTER TABLE member_assessments RENAME TO member_assessments_old;

CREATE TABLE member_results (
    set_id          bigint  NOT NULL,
    scenario        text    NOT NULL,
    member          text    NOT NULL,
    kind            text    NOT NULL,
    dead_kn         double precision NOT NULL,
    live_max_kn     double precision NOT NULL,
    live_min_kn     double precision NOT NULL,
    impact          double precision NOT NULL,
    rf_tension      double precision,
    rf_compression  double precision,
    basis           text    NOT NULL DEFAULT '',
    max_train       text    NOT NULL DEFAULT '',
    max_head_m      double precision,
    max_direction   text    NOT NULL DEFAULT '',
    max_from_m      double precision,
    max_to_m        double precision,
    min_train       text    NOT NULL DEFAULT '',
    min_head_m      double precision,
    min_direction   text    NOT NULL DEFAULT '',
    min_from_m      double precision,
    min_to_m        double precision,
    max_count       integer,
    min_count       integer,
    PRIMARY KEY (set_id, scenario, member)
);

CREATE TABLE member_assessments (
    set_id          bigint  NOT NULL,
    member          text    NOT NULL,
    rf_existing     double precision,
    rf_proposed     double precision,
    sense_proposed  text    NOT NULL DEFAULT '',
    demand_increase double precision NOT NULL DEFAULT 0,
    flags           text[]  NOT NULL DEFAULT '{}',
    PRIMARY KEY (set_id, member)
);

INSERT INTO member_results (set_id, scenario, member, kind, dead_kn, live_max_kn, live_min_kn, impact,
    rf_tension, rf_compression, basis, max_train, max_head_m, max_direction, max_from_m, max_to_m,
    min_train, min_head_m, min_direction, min_from_m, min_to_m, max_count, min_count)
SELECT l.set_id, m.scenario, m.member, m.kind, m.dead_kn, m.live_max_kn, m.live_min_kn, m.impact,
    m.rf_tension, m.rf_compression, m.basis, m.max_train, m.max_head_m, m.max_direction, m.max_from_m, m.max_to_m,
    m.min_train, m.min_head_m, m.min_direction, m.min_from_m, m.min_to_m, m.max_count, m.min_count
FROM member_results_old m JOIN legacy_sets l ON l.run_id = m.run_id AND l.bridge_id = m.bridge_id;

INSERT INTO member_assessments (set_id, member, rf_existing, rf_proposed, sense_proposed, demand_increase, flags)
SELECT l.set_id, a.member, a.rf_existing, a.rf_proposed, a.sense_proposed, a.demand_increase, a.flags
FROM member_assessments_old a JOIN legacy_sets l ON l.run_id = a.run_id AND l.bridge_id = a.bridge_id;

DROP TABLE member_results_old;
DROP TABLE member_assessments_old;

CREATE INDEX run_bridges_set ON run_bridges (set_id) WHERE set_id IS NOT NULL;

-- A run's picture: one row a bridge, the run's own row where it has one, else its base run's
-- picture's, down to a complete run; bridges marked removed are left out. A row whose run_id
-- is not the run's own was carried forward from that run.
CREATE FUNCTION run_picture(p_run bigint) RETURNS SETOF run_bridges
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

---- create above / drop below ----

DROP INDEX run_bridges_set;
ALTER TABLE member_results RENAME TO member_results_new;
ALTER TABLE member_assessments RENAME TO member_assessments_new;
CREATE TABLE member_results (
    run_id          bigint  NOT NULL,
    bridge_id       text    NOT NULL,
    scenario        text    NOT NULL,
    member          text    NOT NULL,
    kind            text    NOT NULL,
    dead_kn         double precision NOT NULL,
    live_max_kn     double precision NOT NULL,
    live_min_kn     double precision NOT NULL,
    impact          double precision NOT NULL,
    rf_tension      double precision,
    rf_compression  double precision,
    basis           text    NOT NULL DEFAULT '',
    max_train       text    NOT NULL DEFAULT '',
    max_head_m      double precision,
    max_direction   text    NOT NULL DEFAULT '',
    max_from_m      double precision,
    max_to_m        double precision,
    min_train       text    NOT NULL DEFAULT '',
    min_head_m      double precision,
    min_direction   text    NOT NULL DEFAULT '',
    min_from_m      double precision,
    min_to_m        double precision,
    max_count       integer,
    min_count       integer,
    PRIMARY KEY (run_id, bridge_id, scenario, member)
);
CREATE TABLE member_assessments (
    run_id          bigint  NOT NULL,
    bridge_id       text    NOT NULL,
    member          text    NOT NULL,
    rf_existing     double precision,
    rf_proposed     double precision,
    sense_proposed  text    NOT NULL DEFAULT '',
    demand_increase double precision NOT NULL DEFAULT 0,
    flags           text[]  NOT NULL DEFAULT '{}',
    PRIMARY KEY (run_id, bridge_id, member)
);
-- Every run gets the rows of its picture again: a run that held only what changed is made
-- whole from its base runs first.
INSERT INTO run_bridges (run_id, bridge_id, input_hash, status, error, source_run_id, worst_member, rf_existing,
    rf_proposed, demand_increase, headroom, flags, flag_counts, governing_train, governing_sense, governing_head_m,
    governing_direction, governing_from_m, governing_to_m, screened_at, requeues, set_id)
SELECT r.id, p.bridge_id, p.input_hash, CASE WHEN p.status = 'failed' THEN 'failed' ELSE 'carried' END, p.error, coalesce(p.source_run_id, p.run_id), p.worst_member,
    p.rf_existing, p.rf_proposed, p.demand_increase, p.headroom, p.flags, p.flag_counts, p.governing_train,
    p.governing_sense, p.governing_head_m, p.governing_direction, p.governing_from_m, p.governing_to_m,
    p.screened_at, p.requeues, p.set_id
FROM runs r CROSS JOIN LATERAL run_picture(r.id) p
WHERE NOT r.complete AND p.run_id <> r.id;
DELETE FROM run_bridges WHERE status = 'removed';
INSERT INTO member_results (run_id, bridge_id, scenario, member, kind, dead_kn, live_max_kn, live_min_kn, impact,
    rf_tension, rf_compression, basis, max_train, max_head_m, max_direction, max_from_m, max_to_m,
    min_train, min_head_m, min_direction, min_from_m, min_to_m, max_count, min_count)
SELECT r.run_id, r.bridge_id, m.scenario, m.member, m.kind, m.dead_kn, m.live_max_kn, m.live_min_kn, m.impact,
    m.rf_tension, m.rf_compression, m.basis, m.max_train, m.max_head_m, m.max_direction, m.max_from_m, m.max_to_m,
    m.min_train, m.min_head_m, m.min_direction, m.min_from_m, m.min_to_m, m.max_count, m.min_count
FROM member_results_new m JOIN run_bridges r ON r.set_id = m.set_id;
INSERT INTO member_assessments (run_id, bridge_id, member, rf_existing, rf_proposed, sense_proposed, demand_increase, flags)
SELECT r.run_id, r.bridge_id, a.member, a.rf_existing, a.rf_proposed, a.sense_proposed, a.demand_increase, a.flags
FROM member_assessments_new a JOIN run_bridges r ON r.set_id = a.set_id;
DROP TABLE member_results_new;
DROP TABLE member_assessments_new;
ALTER TABLE run_bridges DROP CONSTRAINT run_bridges_status_check;
ALTER TABLE run_bridges ADD CONSTRAINT run_bridges_status_check
    CHECK (status IN ('pending', 'done', 'failed', 'carried'));
ALTER TABLE run_bridges DROP COLUMN set_id;
ALTER TABLE runs DROP COLUMN complete;
DROP FUNCTION run_picture(bigint);
DROP TABLE result_sets;
