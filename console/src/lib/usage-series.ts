export interface UsageDay {
  date: string;
  runs: number;
  solverSeconds: number;
}

export interface UsagePoint extends UsageDay {
  /** Running totals; null after `throughDate`, so the future is not drawn as flat usage. */
  runsToDate: number | null;
  solverSecondsToDate: number | null;
  /** The quota spread evenly over the period: where a tenant on pace for exactly its quota would be. */
  runsPace: number | null;
  solverSecondsPace: number | null;
}

const round = (n: number) => Math.round(n * 1000) / 1000;

/**
 * Daily usage with running totals and an even-pace line against the month's quotas, both up to
 * `throughDate` (YYYY-MM-DD, inclusive; the whole period when absent).
 */
export function usagePoints(days: UsageDay[], quota: { runs: number; solverSeconds: number }, throughDate?: string): UsagePoint[] {
  let runs = 0;
  let seconds = 0;
  return days.map((d, i) => {
    runs += d.runs;
    seconds += d.solverSeconds;
    const share = (i + 1) / days.length;
    const past = !throughDate || d.date <= throughDate;
    return {
      ...d,
      runsToDate: past ? runs : null,
      solverSecondsToDate: past ? round(seconds) : null,
      runsPace: past ? round(quota.runs * share) : null,
      solverSecondsPace: past ? round(quota.solverSeconds * share) : null,
    };
  });
}
