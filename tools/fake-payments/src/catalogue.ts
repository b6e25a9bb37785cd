// What every fake account sells from the start, as an operator would set it up in the provider's
// dashboard for Gridwright: a monthly price per paid plan and a metered price for solver-seconds
// above a plan's allowance. The lookup keys are the ones Gridwright looks prices up by (README,
// "Billing"); the amounts are our own demo figures.
import { newId, type Account } from './store';

export const METER_EVENT_NAME = 'gridwright_solver_seconds';

const PLAN_PRICES = [
  { lookupKey: 'gridwright-field-monthly', product: 'Gridwright Field', unitAmount: 4900 },
  { lookupKey: 'gridwright-fleet-monthly', product: 'Gridwright Fleet', unitAmount: 24900 },
];

export function seedCatalogue(account: Account) {
  const created = Math.floor(Date.now() / 1000);
  const common = { created, livemode: false, metadata: {} };
  for (const plan of PLAN_PRICES) {
    const product = { ...common, id: newId('prod'), object: 'product' as const, name: plan.product, active: true };
    account.products[product.id] = product;
    const price = {
      ...common,
      id: newId('price'),
      object: 'price' as const,
      active: true,
      currency: 'eur',
      lookup_key: plan.lookupKey,
      nickname: `${plan.product}, monthly`,
      unit_amount: plan.unitAmount,
      type: 'recurring' as const,
      product: product.id,
      recurring: { interval: 'month' as const, interval_count: 1, usage_type: 'licensed' as const, meter: null },
      transform_quantity: null,
      billing_scheme: 'per_unit' as const,
    };
    account.prices[price.id] = price;
  }
  const meter = {
    ...common,
    id: newId('mtr'),
    object: 'billing.meter' as const,
    display_name: 'Solver-seconds above the plan',
    event_name: METER_EVENT_NAME,
    status: 'active' as const,
    default_aggregation: { formula: 'sum' as const },
  };
  account.meters[meter.id] = meter;
  const product = { ...common, id: newId('prod'), object: 'product' as const, name: 'Gridwright solver time above the plan', active: true };
  account.products[product.id] = product;
  const metered = {
    ...common,
    id: newId('price'),
    object: 'price' as const,
    active: true,
    currency: 'eur',
    lookup_key: 'gridwright-solver-seconds',
    nickname: 'Solver time above the plan, per started minute',
    // 5 cents per started solver-minute: seconds are reported and divided by 60, rounding up.
    unit_amount: 5,
    type: 'recurring' as const,
    product: product.id,
    recurring: { interval: 'month' as const, interval_count: 1, usage_type: 'metered' as const, meter: meter.id },
    transform_quantity: { divide_by: 60, round: 'up' as const },
    billing_scheme: 'per_unit' as const,
  };
  account.prices[metered.id] = metered;
}
