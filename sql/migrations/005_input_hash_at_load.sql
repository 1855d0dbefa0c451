-- A bridge's input hash is now taken when a job loads the bridge, in the same snapshot as
-- the inputs it screens, so that the hash always describes the inputs its results came
-- from, and the hashing (a few hundred milliseconds for 10,000 bridges) is spread over the
-- jobs instead of holding up the run's start. A run that re-screens only changed bridges
-- still hashes them all when it is created, to decide which to carry forward. The workers
-- need the plan's share of the hash: it is kept with the run. A run created before this
-- migration has none, and keeps the hashes it was created with.

ALTER TABLE runs ADD COLUMN plan_hash text NOT NULL DEFAULT '';

---- create above / drop below ----

ALTER TABLE runs DROP COLUMN plan_hash;
