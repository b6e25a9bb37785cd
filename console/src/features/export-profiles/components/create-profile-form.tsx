import { useState, type FormEvent } from 'react';
import { Button } from '@/components/button';
import { SelectField, TextField } from '@/components/field';
import { ProblemAlert } from '@/components/problem-alert';
import { useCreateExportProfile, type ExportProfileInput } from '../api';
import { parseTagMapText } from '../lib/tag-map-text';

export function CreateProfileForm() {
  const [name, setName] = useState('');
  const [powerUnit, setPowerUnit] = useState<NonNullable<ExportProfileInput['powerUnit']>>('kW');
  const [timestamps, setTimestamps] = useState<NonNullable<ExportProfileInput['timestamps']>>('utc');
  const [delimiter, setDelimiter] = useState<NonNullable<ExportProfileInput['delimiter']>>(',');
  const [tags, setTags] = useState('');
  const create = useCreateExportProfile();
  const parsed = parseTagMapText(tags);
  const submit = (e: FormEvent) => {
    e.preventDefault();
    if (parsed.badLines.length) return;
    create.mutate({ name: name.trim(), powerUnit, timestamps, delimiter, tagMap: parsed.tagMap }, { onSuccess: () => { setName(''); setTags(''); } });
  };
  return (
    <form onSubmit={submit} className="space-y-3" aria-label="New export profile">
      <TextField label="Name" required value={name} onChange={(e) => setName(e.target.value)} placeholder="e.g. plant-north" />
      <div className="grid grid-cols-3 gap-2">
        <SelectField label="Power unit" value={powerUnit} onChange={(e) => setPowerUnit(e.target.value as typeof powerUnit)}>
          <option value="kW">kW</option>
          <option value="MW">MW</option>
        </SelectField>
        <SelectField label="Timestamps" value={timestamps} onChange={(e) => setTimestamps(e.target.value as typeof timestamps)}>
          <option value="utc">UTC (Z)</option>
          <option value="offset">local (spec's time zone)</option>
        </SelectField>
        <SelectField label="Delimiter" value={delimiter} onChange={(e) => setDelimiter(e.target.value as typeof delimiter)}>
          <option value=",">comma</option>
          <option value=";">semicolon</option>
          <option value="tab">tab</option>
          <option value="|">pipe</option>
        </SelectField>
      </div>
      <div>
        <label htmlFor="tag-map" className="mb-1 block text-xs font-medium text-ash-700">SCADA tag map (one <code className="font-mono">column = tag</code> per line)</label>
        <textarea
          id="tag-map"
          rows={5}
          value={tags}
          onChange={(e) => setTags(e.target.value)}
          placeholder={'ely-1.powerKw = PN.ELY1.P_SP\nbess-1.socKwh = PN.BESS1.SOC\nh2-tank.level = PN.TANK1.LVL'}
          aria-invalid={parsed.badLines.length > 0 || undefined}
          className="w-full rounded-md border border-ash-300 px-2.5 py-1.5 font-mono text-xs focus:border-kiln-500 focus:outline-none"
        />
        <p className="mt-1 text-[11px] text-ash-500">
          Columns by their kW names: <code className="font-mono">site.…Kw</code>, <code className="font-mono">grid.importKw</code>,{' '}
          <code className="font-mono">&lt;unit&gt;.on|powerKw|reserveKw</code>, <code className="font-mono">&lt;battery&gt;.chargeKw|dischargeKw|socKwh|reserveKw</code>,{' '}
          <code className="font-mono">site.reserveRequiredKw|reserveHeldKw|reserveShortfallKw</code>, <code className="font-mono">site.marginalValuePerKwh</code>,{' '}
          <code className="font-mono">&lt;store&gt;.level|shortfall|spill|marginalValue</code> (in the store&apos;s unit).
        </p>
        {parsed.badLines.length > 0 && <p className="text-xs text-red-700">Line {parsed.badLines.join(', ')}: write it as column = tag.</p>}
      </div>
      <ProblemAlert error={create.error} />
      <Button type="submit" variant="primary" disabled={create.isPending}>Save profile</Button>
    </form>
  );
}
