-- The result tables lose their foreign keys to run_bridges. A bridge's result rows are
-- written only by store's writeResults, in the transaction that holds the lock on the
-- bridge's run_bridges row and marks it done, so the key checked nothing that the writer had
-- not already ensured; and the check, a trigger run for every row, cost the server more than
-- inserting the row itself, the largest part of its work in a fleet run (BENCHMARKS.md,
-- "Fleet run"). Without the cascade, store's DeleteRun deletes a run's results itself.

ALTER TABLE member_results DROP CONSTRAINT member_results_run_id_bridge_id_fkey;
ALTER TABLE member_assessments DROP CONSTRAINT member_assessments_run_id_bridge_id_fkey;

---- create above / drop below ----

DELETE FROM member_results m WHERE NOT EXISTS
    (SELECT 1 FROM run_bridges r WHERE r.run_id = m.run_id AND r.bridge_id = m.bridge_id);
DELETE FROM member_assessments m WHERE NOT EXISTS
    (SELECT 1 FROM run_bridges r WHERE r.run_id = m.run_id AND r.bridge_id = m.bridge_id);
ALTER TABLE member_results ADD CONSTRAINT member_results_run_id_bridge_id_fkey
    FOREIGN KEY (run_id, bridge_id) REFERENCES run_bridges (run_id, bridge_id) ON DELETE CASCADE;
ALTER TABLE member_assessments ADD CONSTRAINT member_assessments_run_id_bridge_id_fkey
    FOREIGN KEY (run_id, bridge_id) REFERENCES run_bridges (run_id, bridge_id) ON DELETE CASCADE;
