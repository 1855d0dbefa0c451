-- The floor system: stringers and floor beams, rated beside the truss members where the
-- inventory gives floor data (package screening/floor).
--
-- bridges: the distance between a track's two stringer lines, the dead load per stringer line
-- and a floor beam's own weight per metre; NULL takes the screening's documented defaults.
-- A bridge whose row gives any of them (or that has floor elements in members) has its floor
-- system rated.
--
-- members: a floor element's row (label S<track>-<panel> for a track's stringers in a panel,
-- FB<point> for the floor beam at a deck panel point) holds a moment capacity (kN·m) and a
-- shear capacity (kN), or a stored rating factor rated in the sense 'moment' or 'shear'.

ALTER TABLE bridges
    ADD COLUMN stringer_spacing_m double precision CHECK (stringer_spacing_m > 0),
    ADD COLUMN stringer_dead_kn_per_m double precision CHECK (stringer_dead_kn_per_m > 0),
    ADD COLUMN floor_beam_dead_kn_per_m double precision CHECK (floor_beam_dead_kn_per_m > 0);

-- A change of the floor data changes the bridge's screening input (as 010 does for the rest).
CREATE TRIGGER bridges_floor_input_version BEFORE UPDATE ON bridges FOR EACH ROW
WHEN ((OLD.stringer_spacing_m, OLD.stringer_dead_kn_per_m, OLD.floor_beam_dead_kn_per_m)
      IS DISTINCT FROM
      (NEW.stringer_spacing_m, NEW.stringer_dead_kn_per_m, NEW.floor_beam_dead_kn_per_m))
EXECUTE FUNCTION bridge_inputs_changed();

ALTER TABLE members
    ADD COLUMN capacity_moment_knm double precision CHECK (capacity_moment_knm > 0),
    ADD COLUMN capacity_shear_kn double precision CHECK (capacity_shear_kn > 0);

ALTER TABLE members DROP CONSTRAINT members_rating_sense_check;
ALTER TABLE members ADD CONSTRAINT members_rating_sense_check
    CHECK (rating_sense IN ('tension', 'compression', 'moment', 'shear'));
ALTER TABLE members DROP CONSTRAINT members_check1;
ALTER TABLE members ADD CONSTRAINT members_has_capacity
    CHECK (capacity_tension_kn IS NOT NULL OR capacity_compression_kn IS NOT NULL
        OR capacity_moment_knm IS NOT NULL OR capacity_shear_kn IS NOT NULL OR rating_factor IS NOT NULL);

---- create above / drop below ----

DELETE FROM members WHERE capacity_tension_kn IS NULL AND capacity_compression_kn IS NULL AND rating_factor IS NULL;
UPDATE members SET rating_sense = NULL WHERE rating_sense IN ('moment', 'shear');
ALTER TABLE members DROP CONSTRAINT members_has_capacity;
ALTER TABLE members ADD CONSTRAINT members_check1
    CHECK (capacity_tension_kn IS NOT NULL OR capacity_compression_kn IS NOT NULL OR rating_factor IS NOT NULL);
ALTER TABLE members DROP CONSTRAINT members_rating_sense_check;
ALTER TABLE members ADD CONSTRAINT members_rating_sense_check CHECK (rating_sense IN ('tension', 'compression'));
ALTER TABLE members DROP COLUMN capacity_shear_kn, DROP COLUMN capacity_moment_knm;
DROP TRIGGER bridges_floor_input_version ON bridges;
ALTER TABLE bridges DROP COLUMN floor_beam_dead_kn_per_m, DROP COLUMN stringer_dead_kn_per_m, DROP COLUMN stringer_spacing_m;
