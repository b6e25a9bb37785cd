// What a worker process does for billing besides answering events: end grace periods that are over
// and send usage reports that did not go through. Every worker runs it; the account lock and the
// reports' identifiers make running it twice at once harmless.
import type { AppContext } from '../context';
import { endExpiredGracePeriods } from './grace-period';
import { sendUsageReports } from './metered-usage';
import { billingEnabled } from './provider';

const SWEEP_EVERY_MS = 60_000;

export function startBillingSweeps(ctx: AppContext): { stop(): Promise<void> } {
  if (!billingEnabled(ctx)) return { stop: async () => {} };
  let running: Promise<void> = Promise.resolve();
  const sweep = () => {
    running = (async () => {
      await endExpiredGracePeriods(ctx).catch((err) => ctx.log.warn({ err }, 'ending grace periods failed; tried again in a minute'));
      await sendUsageReports(ctx).catch((err) => ctx.log.warn({ err }, 'sending usage reports failed; tried again in a minute'));
    })();
  };
  const timer = setInterval(sweep, SWEEP_EVERY_MS);
  timer.unref();
  return {
    async stop() {
      clearInterval(timer);
      await running;
    },
  };
}
