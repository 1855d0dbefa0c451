-- How often a bridge was queued again because it was pending with no job left to work it
-- (its job's commit was lost, or the job itself is gone). A run queues such a bridge again at
-- most a few times, then records it as failed, so that every run ends.

ALTER TABLE run_bridges ADD COLUMN requeues smallint NOT NULL DEFAULT 0;

---- create above / drop below ----

ALTER TABLE run_bridges DROP COLUMN requeues;
