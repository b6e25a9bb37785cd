import type { ObjectiveTerms } from '@gridwright/shared/run-result';

export interface ObjectiveTermBar {
  key: keyof ObjectiveTerms | 'objective';
  label: string;
  /** Signed money: value earned positive, cost negative (SPEC §5). */
  value: number;
  sign: 'value' | 'cost' | 'total';
}

const labels: Record<keyof ObjectiveTerms, string> = {
  energy: 'Energy',
  noLoad: 'No-load',
  starts: 'Starts',
  demandCharges: 'Demand charges',
  penalties: 'Penalties',
  cycleCost: 'Battery cycling',
};

/** What each term gathers, for the tooltip. */
export const termMeanings: Record<ObjectiveTermBar['key'], string> = {
  energy: "export revenue − import cost + flexible loads' value − generators' energy cost",
  noLoad: 'no-load cost of every hour a unit is on',
  starts: 'start-up costs, hot and cold',
  demandCharges: 'demand charges on the import peaks',
  penalties: 'unserved load, reserve shortfall and store shortfall at their penalties',
  cycleCost: 'cycle cost of battery discharge',
  objective: 'the sum of the terms: the objective the solver maximised',
};

/** One bar per term in the order of SPEC §5, then the objective they sum to. */
export function objectiveTermBars(terms: ObjectiveTerms, objective: number | null): ObjectiveTermBar[] {
  const bars: ObjectiveTermBar[] = (Object.keys(labels) as (keyof ObjectiveTerms)[]).map((key) => ({
    key,
    label: labels[key],
    value: terms[key],
    // A term that is exactly 0 is neither; it is drawn as no bar, and counted as a cost for its colour.
    sign: terms[key] > 0 ? 'value' : 'cost',
  }));
  const total = objective ?? bars.reduce((acc, b) => acc + b.value, 0);
  bars.push({ key: 'objective', label: 'Objective', value: total, sign: 'total' });
  return bars;
}
