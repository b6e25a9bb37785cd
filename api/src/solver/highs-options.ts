/**
 * HiGHS options by class of model, each measured on the engine's own models (day-ahead sites,
 * demo sites, rolling windows of a grid-tied year; HiGHS 1.15.1 in WebAssembly, CPU time of warm
 * solves, median of 3–5 runs each).
 */

/** What every solve sets, whatever its class. */
interface Common {
  timeLimitSeconds: number;
  mipGap: number;
  mipAbsGap?: number;
  wantLog: boolean;
}

export type HighsOptions = Record<string, number | boolean | string>;

/**
 * A MIP: the engine's window and block models, unit commitment with storage.
 * - No feasibility jump: on these small models it took about half of the solve time without
 *   finding better incumbents.
 * - No restarts after the root and no root reduced-cost heuristic: on rolling windows of
 *   grid-tied sites with a battery (60 windows: 23.6 s → 16.5 s) and on 20-unit windows
 *   (174 s → 89 s), restarts rebuilt the cut loop the hard windows had just finished, and the
 *   heuristic found nothing the cut loop did not.
 * - No RENS sub-MIP: over 18 models (five day-ahead sites, three demo sites, ten rolling windows)
 *   3.9 s against 4.7 s, up to 45 % less on sites whose curves or stores leave a weak LP bound
 *   (a dairy farm's heat store, an irrigation reservoir), at most 13 % slower on any one model;
 *   RINS, which starts from an incumbent, finds what RENS found. Switching both off was 70 % slower.
 */
const MIP_OPTIONS: HighsOptions = {
  mip_heuristic_run_feasibility_jump: false,
  mip_allow_restart: false,
  mip_heuristic_run_root_reduced_cost: false,
  mip_heuristic_run_rens: false,
};

/**
 * An LP (the pricing LPs that give marginal values, bound blocks): no presolve. On the LP
 * relaxations of the same 18 models, 133 ms against 190 ms in all: their presolve reduced little
 * and its postsolve cost as much again.
 */
const LP_OPTIONS: HighsOptions = {
  presolve: 'off',
};

export function highsOptions(isMip: boolean, common: Common): HighsOptions {
  return {
    time_limit: common.timeLimitSeconds,
    mip_rel_gap: common.mipGap,
    // Each log line is a message to the main thread; a caller without a log sink gets none.
    output_flag: common.wantLog,
    log_to_console: false,
    ...(common.mipAbsGap !== undefined ? { mip_abs_gap: common.mipAbsGap } : {}),
    ...(isMip ? MIP_OPTIONS : LP_OPTIONS),
  };
}
