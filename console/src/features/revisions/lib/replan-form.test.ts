import { describe, expect, it } from 'vitest';
import type { PlannedState } from '@gridwright/shared/revisions';
import { formFromPlan, pointers, requestFromForm, seriesFromText } from './replan-form';

const planned: PlannedState = {
  from: 8,
  startsAt: '2027-11-09T04:00:00+01:00',
  state: {
    storage: { 'bess/a': { socKwh: 212.30000000001 } },
    stores: {},
    units: { 'gen-1': { on: true, stepsInState: 3, powerKw: 120 }, 'gen-2': { on: false, stepsInState: 8, powerKw: null } },
    demandCharges: { monthly: { peakKw: 320.8114 } },
  },
};

describe('the re-plan form', () => {
  it('starts from the plan, each figure keyed by the request pointer an error names (ids escaped per RFC 6901)', () => {
    const form = formFromPlan(planned);
    expect(form.numbers).toEqual({
      '/state/storage/bess~1a/socKwh': '212.3',
      '/state/units/gen-1/stepsInState': '3',
      '/state/units/gen-1/powerKw': '120',
      '/state/units/gen-2/stepsInState': '8',
      '/state/units/gen-2/powerKw': '',
      '/state/demandCharges/monthly/peakKw': '320.811',
    });
    expect(form.unitsOn).toEqual({ 'gen-1': true, 'gen-2': false });
  });

  it('sends every figure shown, the output only of a unit that is on, and only the series pasted', () => {
    const form = formFromPlan(planned);
    form.numbers[pointers.soc('bess/a')] = '40';
    form.unitsOn['gen-1'] = false;
    form.numbers[pointers.stepsInState('gen-1')] = '0';
    form.series.siteLoadKw = '210, 205\n198';
    form.series.importPrice = '0.31 0.29 0.30';
    expect(requestFromForm(8, planned, form)).toEqual({
      from: 8,
      state: {
        storage: { 'bess/a': { socKwh: 40 } },
        stores: {},
        units: { 'gen-1': { on: false, stepsInState: 0 }, 'gen-2': { on: false, stepsInState: 8 } },
        demandCharges: { monthly: { peakKw: 320.811 } },
      },
      series: { siteLoadKw: [210, 205, 198], importPrice: [0.31, 0.29, 0.3] },
    });
  });

  it('passes text that is no number on as NaN, so the API names its field', () => {
    const form = formFromPlan(planned);
    form.numbers[pointers.peak('monthly')] = 'about 300';
    expect(requestFromForm(8, planned, form).state.demandCharges.monthly.peakKw).toBeNaN();
    expect(seriesFromText('  ')).toBeUndefined();
  });
});
