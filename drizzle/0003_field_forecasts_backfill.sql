-- What each field already stores, summarised once into field_forecasts (kept by the jobs
-- from then on). IGNORE: a row the jobs wrote already stays as it is.
INSERT IGNORE INTO `field_forecasts` (`field_id`, `hours`, `first_hour`, `last_hour`, `min_version`, `max_version`, `computed_at`, `orbit_summary`, `max_job_id`)
SELECT `field_id`, COUNT(*), MIN(`hour_start`), MAX(`hour_start`), MIN(`inputs_version`), MAX(`inputs_version`), MAX(`computed_at`), MAX(`orbit_summary`), MAX(`job_id`)
FROM `forecast_hours` GROUP BY `field_id`;
