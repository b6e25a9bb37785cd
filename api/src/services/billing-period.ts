/** Quotas run per calendar month in UTC. */
export interface BillingPeriod {
  key: string;
  start: Date;
  end: Date;
}

export function billingPeriod(at: Date = new Date()): BillingPeriod {
  const start = new Date(Date.UTC(at.getUTCFullYear(), at.getUTCMonth(), 1));
  const end = new Date(Date.UTC(at.getUTCFullYear(), at.getUTCMonth() + 1, 1));
  return { key: start.toISOString().slice(0, 7), start, end };
}
