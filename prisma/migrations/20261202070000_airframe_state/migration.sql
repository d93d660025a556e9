-- The airframe's ready/grounded field is its `state`; `status` is kept for health (assessments).
-- A rename keeps every row's value (SQLite 3.25 or later).
ALTER TABLE "Airframe" RENAME COLUMN "status" TO "state";
