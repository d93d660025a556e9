-- Stored originals are named relative to the data folder, so a moved or restored data folder
-- keeps working. No schema change (the diff is empty); this rewrites the absolute paths written
-- before, "<data folder>/uploads/<sha256>.csv", as "uploads/<sha256>.csv".
UPDATE "FlightLog"
SET "storedPath" = 'uploads/' || "contentHash" || '.csv'
WHERE "storedPath" LIKE '/%/uploads/' || "contentHash" || '.csv';
