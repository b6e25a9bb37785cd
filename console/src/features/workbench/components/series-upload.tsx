import { useState, type FormEvent } from 'react';
import { Button } from '@/components/button';
import { TextField } from '@/components/field';
import { ProblemAlert } from '@/components/problem-alert';
import { useUploadSeries, type UploadedSeries } from '../api';

/** Turns a SCADA CSV export into stored series and points the editor's `supply.seriesId` at the one picked. */
export function SeriesUpload({ onUse }: { onUse: (seriesId: string) => void }) {
  const [file, setFile] = useState<File | null>(null);
  const [name, setName] = useState('');
  const [used, setUsed] = useState<string | null>(null);
  const upload = useUploadSeries();
  const pick = (s: UploadedSeries) => {
    if (!s.id) return;
    setUsed(s.id);
    onUse(s.id);
  };
  const submit = (e: FormEvent) => {
    e.preventDefault();
    if (!file) return;
    upload.mutate({ file, name: name || file.name }, { onSuccess: (series) => series[0] && pick(series[0]) });
  };
  return (
    <form onSubmit={submit} className="space-y-2">
      <div>
        <label htmlFor="series-file" className="mb-1 block text-xs font-medium text-ash-700">
          SCADA CSV (a timestamp column, then kW, W or MW columns)
        </label>
        <input id="series-file" type="file" accept=".csv,text/csv" onChange={(e) => setFile(e.target.files?.[0] ?? null)} className="block w-full text-xs file:mr-2 file:rounded file:border file:border-ash-300 file:bg-white file:px-2 file:py-1" />
      </div>
      <TextField label="Series name" value={name} onChange={(e) => setName(e.target.value)} placeholder="defaults to the file name" />
      <Button type="submit" size="sm" disabled={!file || upload.isPending}>
        {upload.isPending ? 'Uploading…' : 'Upload and use as supply'}
      </Button>
      {upload.data && (
        <ul className="space-y-1 text-xs" aria-label="Uploaded series">
          {upload.data.map((s) => (
            <li key={s.id} className="flex items-center gap-2">
              <span className="min-w-0 flex-1 truncate">
                <code className="font-mono">{s.column}</code> · {s.steps} steps of {s.stepMinutes} min
                {s.filledSteps ? ` · ${s.filledSteps} filled` : ''}
              </span>
              {s.id === used ? (
                <span className="text-kiln-700">in use</span>
              ) : (
                <Button size="sm" variant="ghost" onClick={() => pick(s)}>
                  Use
                </Button>
              )}
            </li>
          ))}
        </ul>
      )}
      <ProblemAlert error={upload.error} />
    </form>
  );
}
