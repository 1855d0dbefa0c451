-- Runs can be pruned (trussfleet runs prune). A run whose base run is pruned keeps its
-- carried results (they are its own rows) and forgets only where they were carried from.

ALTER TABLE runs DROP CONSTRAINT runs_base_run_id_fkey;
ALTER TABLE runs ADD CONSTRAINT runs_base_run_id_fkey
    FOREIGN KEY (base_run_id) REFERENCES runs (id) ON DELETE SET NULL;

---- create above / drop below ----

ALTER TABLE runs DROP CONSTRAINT runs_base_run_id_fkey;
ALTER TABLE runs ADD CONSTRAINT runs_base_run_id_fkey FOREIGN KEY (base_run_id) REFERENCES runs (id);
