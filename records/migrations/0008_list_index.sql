-- 0008: the patient list's order (in care first, newest admissions first),
-- so the default list reads a page of rows instead of sorting every patient.
CREATE INDEX patients_list ON patients(status = 'in-care', admitted_at, id);
