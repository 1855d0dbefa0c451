-- The index of a run's pending bridges also holds their ids. A job looks up its own 50
-- pending bridges; on the index of the run alone, which the planner prefers for a run too new
-- to have statistics, that meant reading every pending bridge of the run and filtering them
-- (17 ms a job at 10,000 bridges, growing with the fleet). With the ids in the index the same
-- plan finds just the job's bridges. The progress count is still read from the index alone.

DROP INDEX run_bridges_pending;
CREATE INDEX run_bridges_pending ON run_bridges (run_id, bridge_id) WHERE status = 'pending';

---- create above / drop below ----

DROP INDEX run_bridges_pending;
CREATE INDEX run_bridges_pending ON run_bridges (run_id) WHERE status = 'pending';
