-- Passes stored before the status columns existed: their status was last set when the
-- pass was last changed, by the person who booked it (the best record there is).
UPDATE `passes` SET `status_changed_at` = `updated_at`, `status_changed_by` = `created_by` WHERE `status_changed_at` IS NULL;
