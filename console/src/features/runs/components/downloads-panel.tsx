import { useMutation } from '@tanstack/react-query';
import { useState } from 'react';
import { Button } from '@/components/button';
import { SelectField } from '@/components/field';
import { ProblemAlert } from '@/components/problem-alert';
import { useExportProfiles } from '@/lib/queries/export-profiles';
import { usePermission } from '@/lib/session';
import { downloadSchedule } from '../api';

export function DownloadsPanel({ runId }: { runId: string }) {
  const canReadProfiles = usePermission('exportProfiles.read');
  const profiles = useExportProfiles(canReadProfiles);
  const [profileId, setProfileId] = useState('');
  const download = useMutation({ mutationFn: (format: 'json' | 'csv') => downloadSchedule(runId, format, profileId || undefined) });
  return (
    <div className="flex flex-wrap items-end gap-2">
      <Button onClick={() => download.mutate('json')} disabled={download.isPending}>
        Download JSON
      </Button>
      <SelectField label="CSV export profile" className="w-56" value={profileId} onChange={(e) => setProfileId(e.target.value)}>
        <option value="">Default columns</option>
        {profiles.data?.items.map((p) => (
          <option key={p.id} value={p.id}>
            {p.name}
          </option>
        ))}
      </SelectField>
      <Button onClick={() => download.mutate('csv')} disabled={download.isPending}>
        Download CSV
      </Button>
      <ProblemAlert error={download.error} className="w-full" />
    </div>
  );
}
