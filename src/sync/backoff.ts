/**
 * When to try again after a failure that may pass: exponential back-off with jitter, capped at five minutes
 * (reliability plan T5.3). source: "Exponential Backoff And Jitter", AWS Architecture Blog (2015), "equal jitter" variant (never less than half the step).
 */
export const BACKOFF_BASE_MS = 2_000;
export const BACKOFF_CAP_MS = 5 * 60_000;

/** Delay before attempt `attempt` (1 = first retry): random in [0.5, 1] × min(cap, base × 2^(attempt − 1)). */
export function backoffDelayMs(attempt: number, random: () => number = Math.random): number {
  const ceiling = Math.min(BACKOFF_CAP_MS, BACKOFF_BASE_MS * 2 ** Math.max(0, attempt - 1));
  return Math.round(ceiling * (0.5 + 0.5 * random()));
}
