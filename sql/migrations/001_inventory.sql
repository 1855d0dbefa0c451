-- The inventory: what the owner knows about each span and its members, the trains it may
-- screen against, and a record of every import. Units: kN and m (see package doc).

CREATE TABLE import_batches (
    id          bigint GENERATED ALWAYS AS IDENTITY PRIMARY KEY,
    kind        text        NOT NULL CHECK (kind IN ('bridges', 'members', 'trains')),
    file_name   text        NOT NULL,
    sha256      text        NOT NULL CHECK (sha256 ~ '^[0-9a-f]{64}$'),
    rows        integer     NOT NULL CHECK (rows >= 0),
    inserted    integer     NOT NULL CHECK (inserted >= 0),
    updated     integer     NOT NULL CHECK (updated >= 0),
    unchanged   integer     NOT NULL CHECK (unchanged >= 0),
    started_at  timestamptz NOT NULL,
    finished_at timestamptz NOT NULL DEFAULT now()
);

CREATE TABLE bridges (
    -- The owner's asset key: the natural key every import upserts on.
    bridge_id          text PRIMARY KEY CHECK (bridge_id <> ''),
    name               text NOT NULL DEFAULT '',
    line               text NOT NULL DEFAULT '',
    chainage_km        double precision,
    truss_type         text NOT NULL,
    span_m             double precision NOT NULL CHECK (span_m > 0),
    panels             integer NOT NULL CHECK (panels > 0),
    depth_m            double precision NOT NULL CHECK (depth_m > 0),
    deck               text NOT NULL CHECK (deck IN ('through', 'deck')),
    -- Empty: the truss type's default end posts for the deck position.
    end_posts          text NOT NULL DEFAULT '',
    trusses            integer NOT NULL DEFAULT 2 CHECK (trusses >= 1),
    -- Share of one track's load that the analysed truss carries (lever rule; 0.5 for one
    -- centred track between two trusses).
    truss_share        double precision NOT NULL DEFAULT 0.5 CHECK (truss_share > 0 AND truss_share <= 1),
    tracks             integer NOT NULL DEFAULT 1 CHECK (tracks >= 1),
    -- Dead load carried by ONE main truss, kN per metre of span.
    dead_load_kn_per_m double precision NOT NULL CHECK (dead_load_kn_per_m >= 0),
    year_built         integer CHECK (year_built BETWEEN 1700 AND 2200),
    latitude           double precision CHECK (latitude BETWEEN -90 AND 90),
    longitude          double precision CHECK (longitude BETWEEN -180 AND 180),
    last_inspected     date,
    import_batch_id    bigint REFERENCES import_batches (id),
    created_at         timestamptz NOT NULL DEFAULT now(),
    updated_at         timestamptz NOT NULL DEFAULT now(),
    CHECK ((latitude IS NULL) = (longitude IS NULL))
);

CREATE TABLE members (
    bridge_id               text NOT NULL REFERENCES bridges (bridge_id) ON UPDATE CASCADE ON DELETE CASCADE,
    -- The label the geometry generator gives the member, e.g. 'U1-L2'.
    member                  text NOT NULL CHECK (member <> ''),
    -- Capacities are magnitudes, kN, before the condition factor.
    capacity_tension_kn     double precision CHECK (capacity_tension_kn > 0),
    capacity_compression_kn double precision CHECK (capacity_compression_kn > 0),
    -- Stored capacity ratio: the member's rating factor for a named reference loading.
    rating_factor           double precision CHECK (rating_factor > 0),
    reference_train         text,
    condition_factor        double precision NOT NULL DEFAULT 1 CHECK (condition_factor > 0 AND condition_factor <= 1),
    area_mm2                double precision CHECK (area_mm2 > 0),
    fatigue_category        text NOT NULL DEFAULT '',
    import_batch_id         bigint REFERENCES import_batches (id),
    created_at              timestamptz NOT NULL DEFAULT now(),
    updated_at              timestamptz NOT NULL DEFAULT now(),
    PRIMARY KEY (bridge_id, member),
    CHECK ((rating_factor IS NULL) = (reference_train IS NULL)),
    CHECK (capacity_tension_kn IS NOT NULL OR capacity_compression_kn IS NOT NULL OR rating_factor IS NOT NULL)
);

CREATE TABLE trains (
    -- The name a screening run refers to the train by (the train file's own name).
    name            text PRIMARY KEY CHECK (name <> ''),
    file_name       text NOT NULL,
    -- The train file as imported, so that a run can be repeated from the database alone.
    source          text NOT NULL,
    sha256          text NOT NULL CHECK (sha256 ~ '^[0-9a-f]{64}$'),
    imported_at     timestamptz NOT NULL DEFAULT now(),
    import_batch_id bigint REFERENCES import_batches (id),
    created_at      timestamptz NOT NULL DEFAULT now()
);

---- create above / drop below ----

DROP TABLE trains;
DROP TABLE members;
DROP TABLE bridges;
DROP TABLE import_batches;
