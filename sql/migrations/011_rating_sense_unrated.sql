-- A stored rating factor rates one sense: the sense it was rated in (the one that governed
-- under its reference train). rating_sense names it; NULL leaves it to the screening run,
-- which takes the sense in which the reference train's dead plus live force governs.
--
-- A bridge's summary counts its unrated members: members the proposed traffic loads in a
-- sense for which they hold no capacity and no stored rating factor rated in that sense.
-- They are no longer flagged by default, so the count keeps them in sight. NULL for rows
-- screened before this migration.

ALTER TABLE members ADD COLUMN rating_sense text
    CHECK (rating_sense IN ('tension', 'compression'));
ALTER TABLE members ADD CONSTRAINT members_rating_sense_needs_factor
    CHECK (rating_sense IS NULL OR rating_factor IS NOT NULL);

ALTER TABLE run_bridges ADD COLUMN unrated_members integer CHECK (unrated_members >= 0);

---- create above / drop below ----

ALTER TABLE run_bridges DROP COLUMN unrated_members;
ALTER TABLE members DROP CONSTRAINT members_rating_sense_needs_factor;
ALTER TABLE members DROP COLUMN rating_sense;
