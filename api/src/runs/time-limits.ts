// The two clocks a run's time limit sets outside the engine. The engine's own limit is soft (HiGHS
// overshoots it); these stop a solve that overruns and tell a dead worker from a slow one.

/**
 * The queue job's expiry: longer than a solve may legitimately take, so only a dead worker's job
 * expires and is retried (as after a crash).
 */
export function queueExpirySeconds(timeLimitSeconds: number, graceSeconds: number): number {
  return Math.ceil(timeLimitSeconds + graceSeconds);
}

/**
 * When the worker's watchdog terminates a solve still going: the hard stop, halfway into the grace
 * period, well before the queue job expires and the run would be retried as if the worker had died.
 */
export function watchdogMs(timeLimitSeconds: number, graceSeconds: number): number {
  return (timeLimitSeconds + graceSeconds / 2) * 1000;
}
