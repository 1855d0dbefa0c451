-- A bridge's input hash is now taken by the program (store.InputHash) when a job loads the
-- bridge, of the very rows it screens, instead of by SQL when the run is created: the hash
-- always describes the inputs its results came from, a full run no longer waits for every
-- bridge to be hashed before its first job, and an optional number that is absent can no
-- longer hash like one of its neighbours that is (the SQL text joined the numbers skipping
-- NULLs). A run that re-screens only changed bridges still hashes them all when it is
-- created, to decide which to carry forward. The workers need the plan's share of the hash:
-- it is kept with the run. A run created before this migration has none and keeps the
-- hashes it was created with; the first nightly run after it screens every bridge again.

ALTER TABLE runs ADD COLUMN plan_hash text NOT NULL DEFAULT '';

---- create above / drop below ----

ALTER TABLE runs DROP COLUMN plan_hash;
