/**
 * CAS Registry Numbers: format NNNNNNN-NN-R, 2–7 digits, 2 digits, one check digit.
 * Check digit rule published by CAS ("CAS Registry Number verification", cas.org): number the digits
 * right to left starting from the one before the check digit as 1, sum digit × position, take mod 10.
 * Example from CAS: 7732-18-5 (water): 8·1 + 1·2 + 2·3 + 3·4 + 7·5 + 7·6 = 105 → 5.
 */
const CAS_PATTERN = /^(\d{2,7})-(\d{2})-(\d)$/;

export function casCheckDigit(body: string): number {
  if (!/^\d{4,9}$/.test(body)) throw new RangeError("CAS body must be 4 to 9 digits");
  let sum = 0;
  for (let i = 0; i < body.length; i++) {
    sum += Number(body[body.length - 1 - i]) * (i + 1);
  }
  return sum % 10;
}

export type CasCheck = { ok: true; normalized: string } | { ok: false; reason: string };

export function checkCasNumber(input: string): CasCheck {
  const trimmed = input.trim();
  const match = CAS_PATTERN.exec(trimmed);
  if (!match) {
    return { ok: false, reason: "A CAS number looks like 7732-18-5: 2–7 digits, 2 digits and a check digit, joined by hyphens." };
  }
  const [, first, second, check] = match;
  const expected = casCheckDigit(first + second);
  if (expected !== Number(check)) {
    return { ok: false, reason: `The check digit of ${trimmed} should be ${expected}; please re-read the number from the label or SDS.` };
  }
  return { ok: true, normalized: `${Number(first)}-${second}-${check}` };
}
