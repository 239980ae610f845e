-- Shared by the next issues: binary blends, acid/base amount and ionic strength on a condition, and the
-- standard uncertainty of every stored colour (u(L*), u(a*), u(b*) and the combined ± ΔE00).
ALTER TABLE `conditions` ADD `second_solvent_id` text REFERENCES `solvents`(`id`);
--> statement-breakpoint
ALTER TABLE `conditions` ADD `second_solvent_mole_fraction` real;
--> statement-breakpoint
ALTER TABLE `conditions` ADD `additive_concentration_mol_l` real;
--> statement-breakpoint
ALTER TABLE `conditions` ADD `ionic_strength_mol_l` real;
--> statement-breakpoint
ALTER TABLE `measurements` ADD `u_l` real;
--> statement-breakpoint
ALTER TABLE `measurements` ADD `u_a` real;
--> statement-breakpoint
ALTER TABLE `measurements` ADD `u_b` real;
--> statement-breakpoint
ALTER TABLE `measurements` ADD `u_delta_e00` real;
