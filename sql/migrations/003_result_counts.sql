-- The number of vehicles in the last (variable) group of the consist at each extreme, so
-- that a report can show the critical train length without recomputing it.
ALTER TABLE member_results ADD COLUMN max_count integer, ADD COLUMN min_count integer;

---- create above / drop below ----

ALTER TABLE member_results DROP COLUMN max_count, DROP COLUMN min_count;
