-- 0005_rv_goals: a target's radial-velocity goal (planner.RVGoal): the (PostgreSQL twin)
-- model, a rough semi-amplitude K and the velocity error of one exposure
-- (km/s), and the wanted σK/K (a fraction, 0 = none). rv_model '' means the
-- target has no RV goal; older targets get none.

ALTER TABLE targets ADD COLUMN rv_model TEXT NOT NULL DEFAULT '' CHECK (rv_model IN ('', 'circular', 'eccentric'));
ALTER TABLE targets ADD COLUMN rv_k_kms DOUBLE PRECISION NOT NULL DEFAULT 0 CHECK (rv_k_kms >= 0);
ALTER TABLE targets ADD COLUMN rv_sigma_kms DOUBLE PRECISION NOT NULL DEFAULT 0 CHECK (rv_sigma_kms >= 0);
ALTER TABLE targets ADD COLUMN rv_want_rel_k DOUBLE PRECISION NOT NULL DEFAULT 0 CHECK (rv_want_rel_k >= 0 AND rv_want_rel_k < 1);
