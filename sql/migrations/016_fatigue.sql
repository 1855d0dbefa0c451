-- The fatigue check (screening/fatigue). A member's outcome is one more part of its
-- assessment: the columns hold it on member_assessments, written and pruned with the result
-- set like the rest of the row. fatigue_status is '' (the other columns NULL) for members of
-- runs that checked no fatigue and for rows screened before this migration.
--
-- fatigue_status: no-data (no area or category: not checked), below-cut-off, damaged.
-- Damages are Miner sums (1 uses up the life); remaining years NULL where the proposed
-- traffic does no damage (the life does not run out), end year NULL likewise.
-- The fatigue flags (fatigue-life, fatigue-rise) join the member's flags.

ALTER TABLE member_assessments
    ADD COLUMN fatigue_status text NOT NULL DEFAULT '' CHECK (fatigue_status IN ('', 'no-data', 'below-cut-off', 'damaged')),
    ADD COLUMN fatigue_category_mpa double precision,
    ADD COLUMN fatigue_area_mm2 double precision,
    ADD COLUMN fatigue_damage_existing double precision,
    ADD COLUMN fatigue_damage_proposed double precision,
    ADD COLUMN fatigue_damage_ratio double precision,
    ADD COLUMN fatigue_damage_to_date double precision,
    ADD COLUMN fatigue_remaining_years double precision,
    ADD COLUMN fatigue_end_year integer,
    ADD COLUMN fatigue_range_existing_mpa double precision,
    ADD COLUMN fatigue_range_proposed_mpa double precision,
    ADD COLUMN fatigue_train text NOT NULL DEFAULT '';

-- A bridge's fatigue summary: members not checked for want of data, the shortest remaining
-- life, its member, and that life over the planning horizon (fatigue_life_index: below 1 the
-- member is flagged fatigue-life), which the priority order compares with the proposed RF
-- (store/rank.go). NULL where the run checked no fatigue or no life runs out.
ALTER TABLE run_bridges
    ADD COLUMN fatigue_no_data integer CHECK (fatigue_no_data >= 0),
    ADD COLUMN fatigue_life_years double precision,
    ADD COLUMN fatigue_life_index double precision,
    ADD COLUMN fatigue_member text;

-- The year built is now a screening input (the fatigue damage to date): a change of it
-- renews the bridge's input version, as a change of its geometry does (migration 010).
-- A trigger of its own, beside the ones that watch the geometry and the cross-section.
CREATE TRIGGER bridges_year_input_version BEFORE UPDATE ON bridges FOR EACH ROW
WHEN (OLD.year_built IS DISTINCT FROM NEW.year_built)
EXECUTE FUNCTION bridge_inputs_changed();

---- create above / drop below ----

DROP TRIGGER bridges_year_input_version ON bridges;

ALTER TABLE run_bridges
    DROP COLUMN fatigue_member,
    DROP COLUMN fatigue_life_index,
    DROP COLUMN fatigue_life_years,
    DROP COLUMN fatigue_no_data;

ALTER TABLE member_assessments
    DROP COLUMN fatigue_train,
    DROP COLUMN fatigue_range_proposed_mpa,
    DROP COLUMN fatigue_range_existing_mpa,
    DROP COLUMN fatigue_end_year,
    DROP COLUMN fatigue_remaining_years,
    DROP COLUMN fatigue_damage_to_date,
    DROP COLUMN fatigue_damage_ratio,
    DROP COLUMN fatigue_damage_proposed,
    DROP COLUMN fatigue_damage_existing,
    DROP COLUMN fatigue_area_mm2,
    DROP COLUMN fatigue_category_mpa,
    DROP COLUMN fatigue_status;
