-- The network view (screening/network): line categories and Cooper E ratings.
--
-- A screened bridge's run_bridges row names the highest line categories it carries (the
-- maximal elements of the carried set, in the standard's order; empty where none is carried)
-- and its Cooper E rating with the member that has it. NULL where the run did not ask for
-- the network view, and for rows screened before this migration.
--
-- Each member's E rating (80 x its RF under Cooper E80) is a column of member_results, the
-- same on both scenarios' rows. category_results holds, in the result set, each category's
-- outcome: carried (it and every category it dominates pass), passes (it passes, but a
-- category it dominates does not), or fails; the lowest RF of the rated members under its
-- reference train, the member that has it, and what limits it there.

ALTER TABLE run_bridges ADD COLUMN categories text[];
ALTER TABLE run_bridges ADD COLUMN e_rating double precision;
ALTER TABLE run_bridges ADD COLUMN e_member text;

ALTER TABLE member_results ADD COLUMN e_rating double precision;

CREATE TABLE category_results (
    set_id    bigint NOT NULL,
    category  text   NOT NULL,
    status    text   NOT NULL CHECK (status IN ('carried', 'passes', 'fails')),
    rf        double precision,
    member    text   NOT NULL DEFAULT '',
    limit_by  text   NOT NULL DEFAULT '' CHECK (limit_by IN ('', 'axle load', 'mass per metre')),
    PRIMARY KEY (set_id, category)
);

---- create above / drop below ----

DROP TABLE category_results;
ALTER TABLE member_results DROP COLUMN e_rating;
ALTER TABLE run_bridges DROP COLUMN e_member;
ALTER TABLE run_bridges DROP COLUMN e_rating;
ALTER TABLE run_bridges DROP COLUMN categories;
