/**
 * The audit log's action codes and the words people read for them. Pure: no database, no React.
 * Storage and the CSV export keep the code; pages show the words with the code beside them.
 * `recordAudit` accepts only these codes, so a new code cannot be written without its words
 * (tests/unit/audit-actions.test.ts also reads every call site to check).
 */
export const AUDIT_ACTION_WORDS = {
  "calibration-target.create": "added a calibration target",
  "calibration-target.update": "edited a calibration target",
  "check-reading.create": "recorded a check-standard reading",
  "check-standard.create": "registered a check standard",
  "check-standard.retire": "retired a check standard",
  "check-standard.update": "edited a check standard",
  "condition.create": "added a measurement condition",
  "demo.seed": "loaded the demo data",
  "drift-reading.create": "recorded a lighting drift reading",
  "dye.create": "added a dye",
  "dye.update": "edited a dye",
  "dye_model.recompute": "refitted a dye's solvent models",
  "invitation.accept": "accepted an invitation",
  "invitation.create": "sent an invitation",
  "lighting-profile.approve": "approved a lighting profile",
  "lighting-profile.create": "created a lighting profile",
  "lighting-profile.fit": "fitted a lighting profile's calibration",
  "lighting-profile.reopen": "reopened a lighting profile as a draft",
  "lighting-profile.retire": "retired a lighting profile",
  "lighting-profile.update": "edited a lighting profile",
  "measurement.accept": "accepted a measurement",
  "measurement.create": "recorded a measurement",
  "measurement.rederive": "recomputed a measurement's colour with a newer lighting profile",
  "measurement.reject": "rejected a measurement",
  "ph-fit.recompute": "refitted a pH series' pKa",
  "ph-fit.steps": "chose one or two colour changes for a pH series",
  "ph-series.create": "grouped vials into a pH series",
  "ph-series.delete": "deleted a pH series",
  "ph-series.update": "edited a pH series",
  "photo.set-profile": "set a photo's lighting profile",
  "photo.sweep": "removed photo files no record uses",
  "photo.upload": "uploaded a photo",
  "rack-template.create": "saved a rack layout",
  "rack-template.delete": "deleted a rack layout",
  "rack-template.update": "changed a rack layout",
  "shortlist.add": "added a dye to a shortlist",
  "shortlist.create": "created a shortlist",
  "shortlist.note": "edited a note on a shortlist",
  "shortlist.remove": "removed a dye from a shortlist",
  "shortlist.share": "shared a shortlist by e-mail",
  "solvent-panel.create": "saved a solvent panel",
  "solvent-panel.delete": "deleted a solvent panel",
  "solvent-panel.update": "changed a solvent panel",
  "solvent.create": "added a solvent",
  "solvent.update": "edited a solvent",
  "solvents.seed": "loaded the solvent table",
  "spectrum.create": "added an absorbance spectrum",
  "token.create": "created an API token",
  "token.revoke": "revoked an API token",
  "token.revoke-all": "revoked all of a person's API tokens",
  "user.deactivate": "deactivated an account",
  "user.password-change": "changed their password",
  "user.password-reset": "set a new password from a reset link",
  "user.reactivate": "reactivated an account",
  "user.role": "changed a person's role",
} as const satisfies Record<string, string>;

export type AuditAction = keyof typeof AUDIT_ACTION_WORDS;

export function isAuditAction(code: string): code is AuditAction {
  return Object.hasOwn(AUDIT_ACTION_WORDS, code);
}

/**
 * The words for a stored code: "approved a lighting profile". A code this version does not know (a row
 * written by another version) is shown as itself, never hidden.
 */
export function auditActionWords(code: string): string {
  return isAuditAction(code) ? AUDIT_ACTION_WORDS[code] : code;
}
