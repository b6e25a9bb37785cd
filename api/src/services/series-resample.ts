import { DateTime } from 'luxon';
import { MAX_STEPS, STEP_MINUTES } from '@gridwright/shared/site-spec';
import type { FilledRange } from '../db/entities/series';
import { HttpProblem, type ProblemFieldError } from '../lib/problem';
import type { Sample } from './series-csv';

/**
 * Resamples irregular or finer samples to whole steps by the time-weighted mean: each sample's
 * value holds from its timestamp to the next one (the last for the typical spacing). A spacing
 * over 1.5 × the typical one and over one target step is a gap; a gap or an empty cell makes the steps it touches missing.
 * Missing steps are an error naming the rows, unless a fill policy says how to fill them.
 */
export type FillPolicy = 'none' | 'zero' | 'previous' | 'linear';

export interface Resampled {
  startMs: number;
  stepMinutes: number;
  values: number[];
  filled: FilledRange[];
}

const MINUTE = 60_000;
const GAP_FACTOR = 1.5;
const MAX_REPORTED = 20;

interface Held {
  from: number;
  to: number;
  value: number | null;
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

export function defaultStepMinutes(samples: Sample[]): number {
  if (samples.length < 2) return 60;
  const typical = median(samples.slice(1).map((s, i) => s.at - samples[i].at)) / MINUTE;
  return STEP_MINUTES.find((m) => m >= typical - 1e-9) ?? 60;
}

const when = (ms: number, offset: string) => DateTime.fromMillis(ms, { zone: `UTC${offset === '+00:00' ? '' : offset}` }).toISO({ suppressMilliseconds: true });

export function resample(samples: Sample[], opts: { stepMinutes: number; fill: FillPolicy; column: string; offset: string }): Resampled {
  const stepMs = opts.stepMinutes * MINUTE;
  const typical = samples.length > 1 ? median(samples.slice(1).map((s, i) => s.at - samples[i].at)) : stepMs;

  // Irregular samples may be up to a whole target step apart before the space between them is a gap.
  const maxHold = Math.max(GAP_FACTOR * typical, stepMs);
  const held: Held[] = [];
  const missing: ProblemFieldError[] = [];
  samples.forEach((s, i) => {
    const next = samples[i + 1];
    const span = next ? next.at - s.at : typical;
    const holdTo = s.at + (span > maxHold ? typical : span);
    held.push({ from: s.at, to: holdTo, value: s.value });
    if (s.value === null) missing.push({ pointer: '/file', message: `row ${s.row}: column "${opts.column}" has no value` });
    if (next && holdTo < next.at) {
      held.push({ from: holdTo, to: next.at, value: null });
      missing.push({
        pointer: '/file',
        message: `rows ${s.row}–${next.row}: no samples from ${when(holdTo, opts.offset)} to ${when(next.at, opts.offset)} (${Math.round((next.at - holdTo) / MINUTE)} min)`,
      });
    }
  });

  const startMs = Math.ceil(samples[0].at / stepMs) * stepMs;
  const endMs = Math.floor(held[held.length - 1].to / stepMs) * stepMs;
  const steps = Math.round((endMs - startMs) / stepMs);
  if (steps < 1) {
    throw new HttpProblem({
      status: 400,
      slug: 'invalid-series-file',
      title: 'The CSV file cannot be read',
      detail: `The samples do not cover one whole ${opts.stepMinutes}-minute step.`,
      errors: [{ pointer: '/file', message: `covers less than one ${opts.stepMinutes}-minute step` }],
    });
  }
  if (steps > MAX_STEPS) {
    throw new HttpProblem({
      status: 400,
      slug: 'invalid-series-file',
      title: 'The CSV file cannot be read',
      detail: `The samples cover ${steps} steps; a series holds at most ${MAX_STEPS}.`,
      errors: [{ pointer: '/stepMinutes', message: `${steps} steps exceed ${MAX_STEPS}` }],
    });
  }
  if (missing.length && opts.fill === 'none') {
    throw new HttpProblem({
      status: 400,
      slug: 'series-missing-values',
      title: 'The series has missing values',
      detail: `${missing.length} gap${missing.length === 1 ? '' : 's'} in column "${opts.column}": ${missing.slice(0, 3).map((m) => m.message).join('; ')}. Fill them in the file or choose a fill policy (fill=zero|previous|linear).`,
      errors: missing.slice(0, MAX_REPORTED),
    });
  }

  const values: (number | null)[] = [];
  let h = 0;
  for (let k = 0; k < steps; k++) {
    const a = startMs + k * stepMs;
    const b = a + stepMs;
    while (h < held.length && held[h].to <= a) h++;
    let sum = 0;
    let covered = 0;
    let gap = false;
    for (let j = h; j < held.length && held[j].from < b; j++) {
      const overlap = Math.min(b, held[j].to) - Math.max(a, held[j].from);
      if (overlap <= 0) continue;
      if (held[j].value === null) gap = true;
      else {
        sum += held[j].value! * overlap;
        covered += overlap;
      }
    }
    values.push(gap || covered < stepMs - 1 ? null : sum / stepMs);
  }
  return { startMs, stepMinutes: opts.stepMinutes, ...fillMissing(values, opts.fill) };
}

function fillMissing(values: (number | null)[], policy: FillPolicy): { values: number[]; filled: FilledRange[] } {
  const filled: FilledRange[] = [];
  const out = values.slice();
  for (let k = 0; k < out.length; k++) {
    if (out[k] !== null) continue;
    let end = k;
    while (end + 1 < out.length && out[end + 1] === null) end++;
    const before = k > 0 ? (out[k - 1] as number) : null;
    const after = end + 1 < out.length ? (out[end + 1] as number) : null;
    for (let j = k; j <= end; j++) {
      if (policy === 'zero') out[j] = 0;
      else if (policy === 'previous') out[j] = before ?? after ?? 0;
      else if (before !== null && after !== null) out[j] = before + ((after - before) * (j - k + 1)) / (end - k + 2);
      else out[j] = before ?? after ?? 0;
    }
    filled.push({ fromStep: k, toStep: end, policy });
    k = end;
  }
  return { values: out.map((v) => Math.round((v as number) * 1e6) / 1e6), filled };
}
