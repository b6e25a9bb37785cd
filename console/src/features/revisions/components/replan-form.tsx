import { useState } from 'react';
import { useNavigate } from 'react-router-dom';
import type { PlannedState } from '@gridwright/shared/revisions';
import { Button } from '@/components/button';
import { CheckboxField, TextField } from '@/components/field';
import { ProblemAlert } from '@/components/problem-alert';
import { Loading } from '@/components/states';
import { isProblem } from '@/lib/api-problem';
import { formatDateTime } from '@/lib/format';
import { useCreateReplan, usePlannedState } from '../api';
import { formFromPlan, FRESH_SERIES, pointers, requestFromForm, type ReplanFormValues } from '../lib/replan-form';

/** The step under way now, held to the horizon: where an operator usually re-plans from. */
function stepUnderWay(timestamps: string[]): number {
  const now = Date.now();
  const started = timestamps.filter((ts) => Date.parse(ts) <= now).length;
  return Math.min(timestamps.length - 1, Math.max(0, started - 1));
}

const textarea =
  'w-full rounded-md border border-ash-300 bg-white px-2.5 py-1.5 font-mono text-xs text-ash-900 focus:border-kiln-500 focus:outline-none focus:ring-2 focus:ring-kiln-100 aria-[invalid=true]:border-red-500';

function MeasuredFields({ runId, from, planned }: { runId: string; from: number; planned: PlannedState }) {
  const [values, setValues] = useState<ReplanFormValues>(() => formFromPlan(planned));
  const replan = useCreateReplan(runId);
  const navigate = useNavigate();
  const errorAt = (pointer: string) => {
    const err = replan.error;
    if (!isProblem(err)) return undefined;
    return err.errors.find((e) => e.pointer === pointer || e.pointer.startsWith(`${pointer}/`))?.message;
  };
  const number = (pointer: string, label: string, hint?: string) => (
    <TextField
      key={pointer}
      label={label}
      inputMode="decimal"
      value={values.numbers[pointer] ?? ''}
      hint={hint}
      error={errorAt(pointer)}
      onChange={(e) => setValues((v) => ({ ...v, numbers: { ...v.numbers, [pointer]: e.target.value } }))}
    />
  );
  const submit = () =>
    replan.mutate(requestFromForm(from, planned, values), { onSuccess: (run) => navigate(`/runs/${run.id}?view=revisions`) });
  const { storage, stores, units, demandCharges } = planned.state;
  return (
    <form
      className="space-y-4"
      aria-label="Re-plan from measured state"
      onSubmit={(e) => {
        e.preventDefault();
        submit();
      }}
    >
      {Object.keys(storage).length > 0 && (
        <fieldset className="grid gap-3 sm:grid-cols-2 lg:grid-cols-3">
          <legend className="mb-1 text-xs font-semibold uppercase tracking-wide text-ash-500">Batteries</legend>
          {Object.keys(storage).map((id) => number(pointers.soc(id), `State of charge of ${id} (kWh)`))}
        </fieldset>
      )}
      {Object.keys(stores).length > 0 && (
        <fieldset className="grid gap-3 sm:grid-cols-2 lg:grid-cols-3">
          <legend className="mb-1 text-xs font-semibold uppercase tracking-wide text-ash-500">Stores</legend>
          {Object.keys(stores).map((id) => number(pointers.level(id), `Level of ${id}`, "In the store's own unit."))}
        </fieldset>
      )}
      {Object.keys(units).map((id) => (
        <fieldset key={id} className="grid items-end gap-3 sm:grid-cols-[10rem_1fr_1fr]">
          <legend className="mb-1 text-xs font-semibold uppercase tracking-wide text-ash-500">Unit {id}</legend>
          <div className="pb-2">
            <CheckboxField
              label={`${id} is on`}
              checked={values.unitsOn[id] ?? false}
              onChange={(e) => setValues((v) => ({ ...v, unitsOn: { ...v.unitsOn, [id]: e.target.checked } }))}
            />
          </div>
          {number(pointers.stepsInState(id), `Steps ${id} has been in that state`)}
          {values.unitsOn[id] && number(pointers.powerKw(id), `Output of ${id} (kW)`, 'Empty: no ramp limit at the first step.')}
        </fieldset>
      ))}
      {Object.keys(demandCharges).length > 0 && (
        <fieldset className="grid gap-3 sm:grid-cols-2 lg:grid-cols-3">
          <legend className="mb-1 text-xs font-semibold uppercase tracking-wide text-ash-500">Demand charges</legend>
          {Object.keys(demandCharges).map((id) => number(pointers.peak(id), `Peak so far this billing period, ${id} (kW)`))}
        </fieldset>
      )}
      <fieldset className="grid gap-3 lg:grid-cols-2">
        <legend className="mb-1 text-xs font-semibold uppercase tracking-wide text-ash-500">Fresh forecasts and prices (optional, one value per remaining step)</legend>
        {FRESH_SERIES.map(({ field, label }) => {
          const id = `replan-${field}`;
          const error = errorAt(pointers.series(field));
          return (
            <div key={field}>
              <label htmlFor={id} className="mb-1 block text-xs font-medium text-ash-700">
                {label}
              </label>
              <textarea
                id={id}
                rows={2}
                className={textarea}
                placeholder="Empty: keep the plan's forecast. Values separated by commas, spaces or lines."
                aria-invalid={error ? true : undefined}
                value={values.series[field]}
                onChange={(e) => setValues((v) => ({ ...v, series: { ...v.series, [field]: e.target.value } }))}
              />
              {error && <p className="mt-1 text-xs text-red-700">{error}</p>}
            </div>
          );
        })}
      </fieldset>
      <ProblemAlert error={replan.error} />
      <div className="flex items-center gap-3">
        <Button type="submit" variant="primary" disabled={replan.isPending}>
          {replan.isPending ? 'Queuing the re-plan…' : 'Re-plan from this step'}
        </Button>
        <span className="text-xs text-ash-500">A new run is queued; this run's schedule before the step stays as it is.</span>
      </div>
    </form>
  );
}

/**
 * Re-plan from measured state: choose the step, correct the plan's state at its start with what
 * was measured, optionally paste fresh forecasts, and queue the re-plan as a new run of the chain.
 */
export function ReplanForm({ runId, timestamps }: { runId: string; timestamps: string[] }) {
  const [from, setFrom] = useState(() => stepUnderWay(timestamps));
  const [typed, setTyped] = useState(String(from));
  const planned = usePlannedState(runId, from);
  const last = timestamps.length - 1;
  const choose = (text: string) => {
    setTyped(text);
    const step = Number(text);
    if (Number.isInteger(step) && step >= 0 && step <= last) setFrom(step);
  };
  return (
    <div className="space-y-4">
      <div className="flex flex-wrap items-end gap-3">
        <TextField
          label="Re-plan from step"
          className="w-40"
          type="number"
          min={0}
          max={last}
          value={typed}
          onChange={(e) => choose(e.target.value)}
          error={typed === String(from) ? undefined : `a step from 0 to ${last}`}
        />
        <p className="pb-2 text-sm text-ash-600" data-testid="replan-starts-at">
          starts {formatDateTime(timestamps[from])} <span className="font-mono text-xs text-ash-400">{timestamps[from]}</span>; {last - from + 1} step
          {last - from === 0 ? '' : 's'} to re-plan
        </p>
      </div>
      <p className="text-xs text-ash-500">
        The fields start at what the plan expects at the start of that step. Overwrite them with what was measured; what you leave is taken as planned.
      </p>
      {planned.isPending ? (
        <Loading label="Reading the plan's state at that step…" />
      ) : planned.error ? (
        <ProblemAlert error={planned.error} />
      ) : (
        <MeasuredFields key={`${runId}-${from}`} runId={runId} from={from} planned={planned.data} />
      )}
    </div>
  );
}
