-- 0009: the centre's paper size for reports (A4 or US Letter).
ALTER TABLE centre ADD COLUMN page_size TEXT NOT NULL DEFAULT 'A4' CHECK (page_size IN ('A4', 'Letter'));
