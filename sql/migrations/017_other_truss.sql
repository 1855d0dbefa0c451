-- Both main trusses' results. Where a bridge's two main trusses are screened (eccentric
-- tracks, trains kept to tracks, or rows of one truss's members), a member's row holds the
-- governing truss's results (member_results.truss names it); these columns hold the other
-- truss's lowest rating factor under each scenario, for the report's elevation and explain.
-- other_truss is '' (the factors NULL) where one truss was screened, and for rows screened
-- before this migration; a factor is NULL where that truss has none or no finite one.

ALTER TABLE member_assessments
    ADD COLUMN other_truss text NOT NULL DEFAULT '' CHECK (other_truss IN ('', 'A', 'B')),
    ADD COLUMN other_rf_existing double precision,
    ADD COLUMN other_rf_proposed double precision;

---- create above / drop below ----

ALTER TABLE member_assessments
    DROP COLUMN other_rf_proposed,
    DROP COLUMN other_rf_existing,
    DROP COLUMN other_truss;
