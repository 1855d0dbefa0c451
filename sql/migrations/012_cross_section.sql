-- The cross-section of a bridge (docs/inventory.md, "The cross-section"): the distance
-- between its main trusses and where each track lies, from which screening takes each
-- truss's lever-rule share of each track; the line speed and a measured first bending
-- frequency for the dynamic factor of real trains at speed; and the part of the dead load
-- that is the truss's own weight, which acts at both chords' joints (the rest of the dead
-- load acts at the deck chord's panel points).
--
-- A row gives either truss_share and tracks (the shares given directly, as before) or the
-- truss spacing with the track offsets: never both (the importer refuses such a row; the
-- spacing and the offsets come together).

ALTER TABLE bridges
    -- Centre to centre of the main trusses, m.
    ADD COLUMN truss_spacing_m double precision CHECK (truss_spacing_m > 0),
    -- Each track's offset from the bridge's centre line, m, positive towards truss A; one
    -- value per track.
    ADD COLUMN track_offsets_m double precision[]
        CHECK (cardinality(track_offsets_m) >= 1 AND array_position(track_offsets_m, NULL) IS NULL),
    -- The line speed, km/h.
    ADD COLUMN line_speed_kmh double precision CHECK (line_speed_kmh > 0),
    -- The measured first bending frequency of the span, Hz.
    ADD COLUMN first_frequency_hz double precision CHECK (first_frequency_hz > 0),
    -- The part of dead_load_kn_per_m that is the truss's own weight, kN per metre of span.
    ADD COLUMN truss_weight_kn_per_m double precision NOT NULL DEFAULT 0
        CHECK (truss_weight_kn_per_m >= 0 AND truss_weight_kn_per_m <= dead_load_kn_per_m),
    ADD CONSTRAINT bridges_section_together CHECK ((truss_spacing_m IS NULL) = (track_offsets_m IS NULL));

-- The new columns are screening inputs: a change renews the bridge's input version.
DROP TRIGGER bridges_input_version ON bridges;
CREATE TRIGGER bridges_input_version BEFORE UPDATE ON bridges FOR EACH ROW
WHEN ((OLD.truss_type, OLD.span_m, OLD.panels, OLD.depth_m, OLD.deck, OLD.end_posts, OLD.trusses,
       OLD.truss_share, OLD.tracks, OLD.dead_load_kn_per_m, OLD.truss_spacing_m, OLD.track_offsets_m,
       OLD.line_speed_kmh, OLD.first_frequency_hz, OLD.truss_weight_kn_per_m)
      IS DISTINCT FROM
      (NEW.truss_type, NEW.span_m, NEW.panels, NEW.depth_m, NEW.deck, NEW.end_posts, NEW.trusses,
       NEW.truss_share, NEW.tracks, NEW.dead_load_kn_per_m, NEW.truss_spacing_m, NEW.track_offsets_m,
       NEW.line_speed_kmh, NEW.first_frequency_hz, NEW.truss_weight_kn_per_m))
EXECUTE FUNCTION bridge_inputs_changed();

-- member_results keeps one row per member and scenario (its key is unchanged): the row of the
-- main truss that governs the member ('A' or 'B'; 'A' where both carry the same loads), and
-- the loading case behind each extreme, as text: the tracks loaded, their shares and the
-- multiple-presence factor ('' for rows screened before this migration). A writer that does not
-- say which truss leaves truss ''.
ALTER TABLE member_results
    ADD COLUMN truss text NOT NULL DEFAULT 'A' CHECK (truss IN ('A', 'B', '')),
    ADD COLUMN max_case text NOT NULL DEFAULT '',
    ADD COLUMN min_case text NOT NULL DEFAULT '',
    -- The member's dynamic allowance in words: which, the length and why, and the Annex C
    -- factor of trains at speed behind its extremes.
    ADD COLUMN dynamic text NOT NULL DEFAULT '',
    -- The factor on the governing train's own force at its placement that gives each extreme
    -- (the loaded tracks' shares and presence factors, a speed factor over impact); 0 where
    -- no train loads the member in that sense, and for rows screened before this migration.
    ADD COLUMN max_share double precision NOT NULL DEFAULT 0,
    ADD COLUMN min_share double precision NOT NULL DEFAULT 0;

-- A bridge's governing loading case (of its worst member's governing extreme), and whether
-- AREMA's rocking term was left out for want of the truss spacing (NULL before this migration).
ALTER TABLE run_bridges
    ADD COLUMN governing_case text,
    ADD COLUMN no_rocking boolean;

-- members.csv may give a member's row for one main truss ('A' or 'B') where the trusses'
-- members differ; '' is the row for both (as before). A truss's own row stands in for the
-- row for both on that truss.
ALTER TABLE members ADD COLUMN truss text NOT NULL DEFAULT '' CHECK (truss IN ('', 'A', 'B'));
ALTER TABLE members DROP CONSTRAINT members_pkey;
ALTER TABLE members ADD PRIMARY KEY (bridge_id, member, truss);

---- create above / drop below ----

DELETE FROM members WHERE truss <> '';
ALTER TABLE members DROP CONSTRAINT members_pkey;
ALTER TABLE members ADD PRIMARY KEY (bridge_id, member);
ALTER TABLE members DROP COLUMN truss;

ALTER TABLE run_bridges DROP COLUMN no_rocking, DROP COLUMN governing_case;
ALTER TABLE member_results DROP COLUMN min_share, DROP COLUMN max_share, DROP COLUMN dynamic, DROP COLUMN min_case, DROP COLUMN max_case, DROP COLUMN truss;
DROP TRIGGER bridges_input_version ON bridges;
CREATE TRIGGER bridges_input_version BEFORE UPDATE ON bridges FOR EACH ROW
WHEN ((OLD.truss_type, OLD.span_m, OLD.panels, OLD.depth_m, OLD.deck, OLD.end_posts, OLD.trusses,
       OLD.truss_share, OLD.tracks, OLD.dead_load_kn_per_m)
      IS DISTINCT FROM
      (NEW.truss_type, NEW.span_m, NEW.panels, NEW.depth_m, NEW.deck, NEW.end_posts, NEW.trusses,
       NEW.truss_share, NEW.tracks, NEW.dead_load_kn_per_m))
EXECUTE FUNCTION bridge_inputs_changed();
ALTER TABLE bridges DROP CONSTRAINT bridges_section_together,
    DROP COLUMN truss_weight_kn_per_m, DROP COLUMN first_frequency_hz, DROP COLUMN line_speed_kmh,
    DROP COLUMN track_offsets_m, DROP COLUMN truss_spacing_m;
