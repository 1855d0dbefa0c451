-- Fatigue of the floor system (screening/floor_fatigue.go): a stringer's or a floor beam's
-- row in members may hold its elastic section modulus (mm³), with which the fatigue check
-- turns the element's bending moment into a stress (M / W), beside the fatigue_category that
-- members already hold (migration 001). A truss member's row never holds one (the importer
-- refuses it; its stress is force over area_mm2).
--
-- Input version: a change of the column renews the bridge's input_version through the
-- statement-level triggers on members (migration 010, members_changed), which fire on every
-- insert, update and delete of a members row whatever its columns; an import updates a row
-- only where a column differs (store/staging.go), so no trigger of its own is needed here.
--
-- member_assessments: the section modulus a floor element's fatigue check used (NULL for a
-- truss member, whose fatigue_area_mm2 holds its area; NULL where no check was made).

ALTER TABLE members
    ADD COLUMN section_modulus_mm3 double precision CHECK (section_modulus_mm3 > 0);

ALTER TABLE member_assessments
    ADD COLUMN fatigue_section_modulus_mm3 double precision;

---- create above / drop below ----

ALTER TABLE member_assessments DROP COLUMN fatigue_section_modulus_mm3;
ALTER TABLE members DROP COLUMN section_modulus_mm3;
