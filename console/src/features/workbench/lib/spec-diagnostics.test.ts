import { describe, expect, it } from 'vitest';
import { issuesToDiagnostics, localSpecIssues, mergeIssues } from './spec-diagnostics';

const good = {
  horizon: { start: '2027-03-01T00:00:00+01:00', stepMinutes: 60, steps: 2 },
  supply: { availableKw: [10, 20] },
};

describe('localSpecIssues', () => {
  it('accepts a minimal valid spec (SPEC.md §1: horizon and supply are the required parts)', () => {
    expect(localSpecIssues(JSON.stringify(good))).toEqual({ syntax: false, issues: [] });
  });

  it('leaves syntax errors to the JSON parser linter', () => {
    expect(localSpecIssues('{"horizon": ')).toEqual({ syntax: true, issues: [] });
  });

  it('reports a broken field at its pointer', () => {
    const text = JSON.stringify({ ...good, horizon: { ...good.horizon, stepMinutes: 7 } }, null, 2);
    const { issues } = localSpecIssues(text);
    expect(issues.map((i) => i.pointer)).toContain('/horizon/stepMinutes');
  });
});

describe('issuesToDiagnostics', () => {
  const text = JSON.stringify(good, null, 2);

  it('underlines the field the pointer names', () => {
    const [d] = issuesToDiagnostics(text, [{ pointer: '/horizon/steps', message: 'too many' }], 'api');
    expect(text.slice(d.from, d.to)).toBe('"steps": 2');
    expect(d).toMatchObject({ severity: 'error', source: 'api', message: 'too many' });
  });

  it('names the pointer in the message when the field is missing', () => {
    const [d] = issuesToDiagnostics(text, [{ pointer: '/horizon/start2', message: 'required' }], 'api', 'warning');
    expect(text.slice(d.from, d.to)).toBe('"horizon"');
    expect(d.message).toBe('/horizon/start2: required');
    expect(d.severity).toBe('warning');
  });
});

describe('mergeIssues', () => {
  it('lists an issue the console and the API both found once, naming both', () => {
    const stepMinutes = { pointer: '/horizon/stepMinutes', message: 'must be one of 5, 10, 15, 30, 60' };
    const merged = mergeIssues([
      { source: 'site spec', issues: [stepMinutes] },
      { source: 'API', issues: [stepMinutes, { pointer: '/supply/seriesId', message: 'no series' }, stepMinutes] },
    ]);
    expect(merged).toEqual([
      { ...stepMinutes, source: 'site spec · API' },
      { pointer: '/supply/seriesId', message: 'no series', source: 'API' },
    ]);
  });

  it('keeps two messages at one pointer apart', () => {
    const merged = mergeIssues([{ source: 'API', issues: [{ pointer: '/a', message: 'x' }, { pointer: '/a', message: 'y' }] }]);
    expect(merged).toHaveLength(2);
  });
});
