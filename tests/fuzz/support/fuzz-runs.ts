/**
 * How many cases each property runs. `npm test` keeps it small so the whole fuzz folder stays
 * well under a minute; the soak run sets FUZZ_RUNS (e.g. FUZZ_RUNS=5000) for thousands per property.
 */
export function fuzzRuns(defaultRuns: number): number {
  const fromEnv = Number(process.env.FUZZ_RUNS);
  return Number.isFinite(fromEnv) && fromEnv > 0 ? Math.floor(fromEnv) : defaultRuns;
}

/** A fixed seed per property unless FUZZ_SEED is set, so a failure in CI reproduces locally. */
export function fuzzSeed(defaultSeed: number): number {
  const fromEnv = Number(process.env.FUZZ_SEED);
  return Number.isInteger(fromEnv) ? fromEnv : defaultSeed;
}
