/**
 * Sign-in slow-down. OWASP ASVS 4.0.3 §2.2.1 asks for anti-automation that does not lock the rightful
 * owner out: after a few free failures each further one doubles the wait before the next attempt is
 * looked at, up to a ceiling. Counted per account (since its last successful sign-in) and per client
 * address; the right password still works once the wait has passed. Numbers: common practice, no source.
 */
export const THROTTLE_WINDOW_MS = 15 * 60 * 1000;

export const ACCOUNT_POLICY = { free: 3, baseMs: 1000, capMs: 30_000 } as const;
export const ADDRESS_POLICY = { free: 10, baseMs: 1000, capMs: 5 * 60_000 } as const;

export type Policy = { free: number; baseMs: number; capMs: number };
export type Failures = { count: number; lastAt: Date | null };

/** Wait after `count` failures: 0 for the free ones, then base, 2·base, 4·base, … up to the cap. */
export function delayAfter(count: number, policy: Policy): number {
  if (count < policy.free) return 0;
  return Math.min(policy.capMs, policy.baseMs * 2 ** Math.min(count - policy.free, 30));
}

/** Milliseconds still to wait before another attempt is checked (0 = go ahead). */
export function remainingWait(failures: Failures, policy: Policy, now: number): number {
  if (!failures.lastAt) return 0;
  return Math.max(0, failures.lastAt.getTime() + delayAfter(failures.count, policy) - now);
}
