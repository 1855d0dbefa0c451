-- Screening runs and their results. A run screens every bridge against the existing and the
-- proposed traffic; its work is split into jobs of a few bridges each (River's own tables
-- hold the jobs). Each bridge's results are written once, in the transaction that completes
-- its job, and the unique keys below make a second copy impossible.

CREATE TABLE runs (
    id              bigint GENERATED ALWAYS AS IDENTITY PRIMARY KEY,
    status          text        NOT NULL DEFAULT 'running'
                    CHECK (status IN ('running', 'completed', 'interrupted', 'failed')),
    -- 'full' screens every bridge; 'changed' screens the changed ones and carries the rest
    -- forward from base_run_id.
    mode            text        NOT NULL DEFAULT 'full' CHECK (mode IN ('full', 'changed')),
    base_run_id     bigint REFERENCES runs (id),
    started_at      timestamptz NOT NULL DEFAULT now(),
    finished_at     timestamptz,
    program_version text        NOT NULL,
    -- The resolved configuration and its hash, and the train definitions as used.
    config          jsonb       NOT NULL,
    config_hash     text        NOT NULL,
    trains          jsonb       NOT NULL,
    bridges_total   integer     NOT NULL DEFAULT 0,
    note            text        NOT NULL DEFAULT ''
);

-- One row per bridge of a run: its work item and, once screened, its summary.
CREATE TABLE run_bridges (
    run_id            bigint  NOT NULL REFERENCES runs (id) ON DELETE CASCADE,
    bridge_id         text    NOT NULL,
    -- Hash of everything the bridge's result depends on (bridge row, members, trains,
    -- configuration): a nightly run re-screens a bridge only when it changed.
    input_hash        text    NOT NULL,
    status            text    NOT NULL DEFAULT 'pending'
                      CHECK (status IN ('pending', 'done', 'failed', 'carried')),
    error             text    NOT NULL DEFAULT '',
    -- Where a carried result comes from.
    source_run_id     bigint,
    worst_member      text,
    rf_existing       double precision,
    rf_proposed       double precision,
    demand_increase   double precision,
    headroom          double precision,
    flags             text[]  NOT NULL DEFAULT '{}',
    flag_counts       jsonb   NOT NULL DEFAULT '{}',
    governing_train   text,
    governing_sense   text,
    governing_head_m  double precision,
    governing_direction text,
    governing_from_m  double precision,
    governing_to_m    double precision,
    screened_at       timestamptz,
    PRIMARY KEY (run_id, bridge_id)
);

CREATE INDEX run_bridges_pending ON run_bridges (run_id) WHERE status = 'pending';

-- A member's envelope under one scenario.
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
    PRIMARY KEY (run_id, bridge_id, scenario, member),
    FOREIGN KEY (run_id, bridge_id) REFERENCES run_bridges (run_id, bridge_id) ON DELETE CASCADE
);

-- A member's rating under both scenarios and its flags.
CREATE TABLE member_assessments (
    run_id          bigint  NOT NULL,
    bridge_id       text    NOT NULL,
    member          text    NOT NULL,
    rf_existing     double precision,
    rf_proposed     double precision,
    sense_proposed  text    NOT NULL DEFAULT '',
    demand_increase double precision NOT NULL DEFAULT 0,
    flags           text[]  NOT NULL DEFAULT '{}',
    PRIMARY KEY (run_id, bridge_id, member),
    FOREIGN KEY (run_id, bridge_id) REFERENCES run_bridges (run_id, bridge_id) ON DELETE CASCADE
);

---- create above / drop below ----

DROP TABLE member_assessments;
DROP TABLE member_results;
DROP TABLE run_bridges;
DROP TABLE runs;
