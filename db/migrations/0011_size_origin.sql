ALTER TABLE `observation_sizes` ADD `measurement_id` text;--> statement-breakpoint
-- A measured length written before sizes kept their origin came from the entry's latest length measurement when it agrees with it to within that measurement's uncertainty.
UPDATE `observation_sizes` SET `measurement_id` = (
	SELECT m.`id` FROM `photo_measurements` m
	WHERE m.`observation_id` = `observation_sizes`.`observation_id` AND m.`kind` = 'length'
	ORDER BY m.`created_at` DESC, m.`id` DESC LIMIT 1
)
WHERE `dimension` = 'length' AND `method` = 'measured' AND EXISTS (
	SELECT 1 FROM (
		SELECT m.`value`, m.`uncertainty` FROM `photo_measurements` m
		WHERE m.`observation_id` = `observation_sizes`.`observation_id` AND m.`kind` = 'length'
		ORDER BY m.`created_at` DESC, m.`id` DESC LIMIT 1
	) latest
	WHERE abs(latest.`value` - `observation_sizes`.`value_cm`) <= latest.`uncertainty`
);
