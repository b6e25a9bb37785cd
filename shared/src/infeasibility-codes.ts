/**
 * The warning codes of the engine's pre-checks (api/src/engine/precheck-infeasibility.ts): each is a
 * proof that the spec has no schedule as it stands, where other warnings only advise. The console
 * marks them in the editor and asks before a spec that carries one is solved.
 * `tests/unit/infeasibility-codes.test.ts` holds this list to the codes the pre-checks write.
 */
export const INFEASIBILITY_CODES: readonly string[] = [
  'hard-load-exceeds-supply',
  'final-soc-unreachable',
  'initial-state-conflict',
  'reserve-unholdable',
  'store-demand-unmet',
  'store-final-unreachable',
  'ramp-cannot-reach-load',
];

export const provesInfeasible = (code: string) => INFEASIBILITY_CODES.includes(code);
