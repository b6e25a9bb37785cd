// What Gridwright sells, as the payment provider prices it: each plan with a `price_lookup_key` at the
// provider's price of that lookup key, and solver-seconds above a plan's allowance at the metered
// price below. Amounts live at the provider only; the catalogue is read from it and kept a few minutes.
import type { EntityManager } from 'typeorm';
import type { AppContext } from '../context';
import { Plan } from '../db/entities/plan';
import { HttpProblem, validationProblem } from '../lib/problem';
import { atProvider, paymentProvider } from './provider';

/** The metered price of solver-seconds above a plan's allowance, and the meter event its usage is reported as. */
export const SOLVER_SECONDS_PRICE_KEY = 'gridwright-solver-seconds';
export const SOLVER_SECONDS_METER_EVENT = 'gridwright_solver_seconds';

const CATALOGUE_TTL_MS = 5 * 60_000;

export interface PlanPrice {
  planId: string;
  priceId: string;
  /** In the currency's minor unit (cents). */
  amount: number;
  currency: string;
  interval: string;
}

export interface UsagePrice {
  priceId: string;
  /** Minor units per `perSolverSeconds` solver-seconds, every started block counted. */
  amount: number;
  currency: string;
  perSolverSeconds: number;
}

export interface Catalogue {
  plans: Map<string, PlanPrice>;
  planOfPrice: Map<string, string>;
  usage: UsagePrice | null;
}

const cached = new WeakMap<object, { at: number; catalogue: Promise<Catalogue> }>();

async function readCatalogue(ctx: AppContext): Promise<Catalogue> {
  const plans = await ctx.db.getRepository(Plan).find({ order: { sortOrder: 'ASC' } });
  const keyed = plans.filter((p) => p.priceLookupKey);
  const prices = await atProvider(() =>
    paymentProvider(ctx).prices.list({ lookup_keys: [...keyed.map((p) => p.priceLookupKey!), SOLVER_SECONDS_PRICE_KEY], active: true, limit: 100 }),
  );
  const byKey = new Map(prices.data.map((p) => [p.lookup_key, p]));
  const catalogue: Catalogue = { plans: new Map(), planOfPrice: new Map(), usage: null };
  for (const plan of keyed) {
    const price = byKey.get(plan.priceLookupKey);
    if (!price || price.unit_amount === null) {
      ctx.log.warn({ planId: plan.id, lookupKey: plan.priceLookupKey }, 'the payment provider has no price for this plan; it is not for sale');
      continue;
    }
    catalogue.plans.set(plan.id, { planId: plan.id, priceId: price.id, amount: price.unit_amount, currency: price.currency, interval: price.recurring?.interval ?? 'month' });
    catalogue.planOfPrice.set(price.id, plan.id);
  }
  const usage = byKey.get(SOLVER_SECONDS_PRICE_KEY);
  if (usage && usage.unit_amount !== null) {
    catalogue.usage = { priceId: usage.id, amount: usage.unit_amount, currency: usage.currency, perSolverSeconds: usage.transform_quantity?.divide_by ?? 1 };
  }
  return catalogue;
}

/** The provider's prices of the plans for sale, read once every few minutes per process. */
export function loadCatalogue(ctx: AppContext): Promise<Catalogue> {
  const key = ctx.config;
  const hit = cached.get(key);
  if (hit && Date.now() - hit.at < CATALOGUE_TTL_MS) return hit.catalogue;
  const catalogue = readCatalogue(ctx);
  cached.set(key, { at: Date.now(), catalogue });
  catalogue.catch(() => cached.delete(key));
  return catalogue;
}

/** The plan without a price a tenant falls back to when its subscription lapses: the first by sort order. */
export async function freePlanId(manager: EntityManager): Promise<string> {
  const [free] = await manager.query(`SELECT id FROM plans WHERE price_lookup_key IS NULL ORDER BY sort_order, id LIMIT 1`);
  if (!free) throw new Error('no plan without a price: billing needs a free plan to fall back to');
  return free.id;
}

export function priceForPlan(catalogue: Catalogue, planId: string, pointer = '/planId'): PlanPrice {
  const price = catalogue.plans.get(planId);
  if (!price) throw validationProblem([{ pointer, message: `plan "${planId}" is not for sale; plans for sale: ${[...catalogue.plans.keys()].join(', ') || 'none'}` }]);
  return price;
}

export function usagePriceOrFail(catalogue: Catalogue): UsagePrice {
  if (catalogue.usage) return catalogue.usage;
  throw new HttpProblem({
    status: 503,
    slug: 'payment-provider-unavailable',
    title: 'The payment provider has no price for solver time',
    detail: `The provider's account has no active metered price with the lookup key ${SOLVER_SECONDS_PRICE_KEY}; an operator must create it.`,
  });
}
