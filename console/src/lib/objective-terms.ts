import type { ObjectiveTerms } from '@gridwright/shared/run-result';

/** The objective's terms (`kpis.objectiveTerms`) in the order tables and charts show them: a short label and what it covers. */
export const OBJECTIVE_TERMS: { key: keyof ObjectiveTerms; label: string; covers: string }[] = [
  { key: 'energy', label: 'Energy', covers: 'import, export, unit values and costs' },
  { key: 'noLoad', label: 'No-load costs', covers: 'units idling while on' },
  { key: 'starts', label: 'Start costs', covers: 'hot and cold starts' },
  { key: 'demandCharges', label: 'Demand charges', covers: 'peaks above those reached' },
  { key: 'penalties', label: 'Penalties', covers: 'unserved load, shortfalls' },
  { key: 'cycleCost', label: 'Cycle costs', covers: 'battery throughput' },
];
