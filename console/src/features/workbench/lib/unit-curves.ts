/**
 * The price curve of each unit in a spec being edited, for the workbench to draw: the incremental
 * cost (generators) or value (flexible loads) of each slice of output from 0 kW (SPEC §5), or the
 * one price of a unit without a curve. Read leniently from whatever the editor holds, so the charts
 * follow the text while it is still being typed; checking it is the validator's work.
 */

export interface CurvePoint {
  kw: number;
  price: number;
}

export interface UnitCurve {
  id: string;
  kind: 'generator' | 'flexible-load';
  ratingKw: number;
  minStableKw: number;
  noLoadCostPerHour: number;
  /** `curve`: costCurve / valueCurve; `single`: costPerKwh / valuePerKwh (or its default, 0). */
  source: 'curve' | 'single';
  /** Step-after points: each slice's price from where it starts, and the last price again where the last slice ends. */
  points: CurvePoint[];
  /** Number of the first slice (1-based) that breaks the shape the model needs — a cost below the slice before, a value above it; null when none does. */
  breaksShapeAt: number | null;
  /** Where the last slice ends; SPEC §5 wants the rating. */
  endsAtKw: number;
}

const isRecord = (v: unknown): v is Record<string, unknown> => typeof v === 'object' && v !== null && !Array.isArray(v);
const num = (v: unknown): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);

function slicesOf(unit: Record<string, unknown>, field: 'costCurve' | 'valueCurve', priceField: 'costPerKwh' | 'valuePerKwh') {
  const curve = unit[field];
  if (!Array.isArray(curve)) return null;
  const slices = curve
    .filter(isRecord)
    .map((s) => ({ upToKw: num(s.upToKw), price: num(s[priceField]) }))
    .filter((s): s is { upToKw: number; price: number } => s.upToKw !== null && s.price !== null);
  return slices.length > 0 ? slices : null;
}

function curveOf(unit: Record<string, unknown>, index: number): UnitCurve | null {
  const kind = unit.kind;
  const ratingKw = num(unit.ratingKw);
  if ((kind !== 'generator' && kind !== 'flexible-load') || ratingKw === null || ratingKw <= 0) return null;
  const isGenerator = kind === 'generator';
  const priceField = isGenerator ? 'costPerKwh' : 'valuePerKwh';
  const curve = slicesOf(unit, isGenerator ? 'costCurve' : 'valueCurve', priceField);
  const slices = curve ?? [{ upToKw: ratingKw, price: num(unit[priceField]) ?? 0 }];
  const points: CurvePoint[] = slices.map((s, i) => ({ kw: i === 0 ? 0 : slices[i - 1].upToKw, price: s.price }));
  const last = slices[slices.length - 1];
  points.push({ kw: last.upToKw, price: last.price });
  const broken = slices.findIndex((s, i) => i > 0 && (isGenerator ? s.price < slices[i - 1].price : s.price > slices[i - 1].price));
  return {
    id: typeof unit.id === 'string' && unit.id ? unit.id : `unit ${index + 1}`,
    kind,
    ratingKw,
    minStableKw: num(unit.minStableKw) ?? 0,
    noLoadCostPerHour: num(unit.noLoadCostPerHour) ?? 0,
    source: curve ? 'curve' : 'single',
    points,
    breaksShapeAt: broken < 0 ? null : broken + 1,
    endsAtKw: last.upToKw,
  };
}

export function unitCurves(spec: unknown): UnitCurve[] {
  if (!isRecord(spec) || !Array.isArray(spec.units)) return [];
  return spec.units.flatMap((u, i) => (isRecord(u) ? (curveOf(u, i) ?? []) : []));
}
