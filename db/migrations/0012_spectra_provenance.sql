-- Where an uploaded spectrum came from: the file's name (empty for JSON points and the demo) and the unit
-- its wavelengths were sent in (they are stored in nm; µm and cm⁻¹ are converted on upload).
ALTER TABLE `spectra` ADD `original_name` text DEFAULT '' NOT NULL;
--> statement-breakpoint
ALTER TABLE `spectra` ADD `wavelength_unit` text DEFAULT 'nm' NOT NULL;
--> statement-breakpoint
-- Models read a dye's spectra by condition; the dye page lists them by dye (spectra_dye_idx).
CREATE INDEX `spectra_condition_idx` ON `spectra` (`condition_id`);
