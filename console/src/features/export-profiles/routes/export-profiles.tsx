import { ConfirmButton } from '@/components/confirm-button';
import { Table, Td, Th } from '@/components/data-table';
import { PageHeader, Panel } from '@/components/page-header';
import { ProblemAlert } from '@/components/problem-alert';
import { EmptyState, Loading } from '@/components/states';
import { formatDateTime } from '@/lib/format';
import { useExportProfiles } from '@/lib/queries/export-profiles';
import { usePermission } from '@/lib/session';
import { useDeleteExportProfile } from '../api';
import { CreateProfileForm } from '../components/create-profile-form';

export function ExportProfilesRoute() {
  const profiles = useExportProfiles();
  const remove = useDeleteExportProfile();
  const canManage = usePermission('exportProfiles.manage');
  return (
    <div>
      <PageHeader title="CSV export profiles" subtitle="Named CSV layouts for SCADA imports: power unit, timestamp style, delimiter and tag names. Pick one when downloading a run's schedule." />
      <div className="grid gap-4 xl:grid-cols-[1fr_24rem]">
        <div className="min-w-0 space-y-2">
          <ProblemAlert error={remove.error} />
          {profiles.isPending ? (
            <Loading />
          ) : profiles.error ? (
            <ProblemAlert error={profiles.error} />
          ) : profiles.data.items.length === 0 ? (
            <EmptyState title="No export profiles">Downloads use the default columns in kW with UTC timestamps.</EmptyState>
          ) : (
            <Table label="Export profiles">
              <thead>
                <tr>
                  <Th>Name</Th>
                  <Th>Unit</Th>
                  <Th>Timestamps</Th>
                  <Th>Delimiter</Th>
                  <Th className="text-right">Tags</Th>
                  <Th>Changed</Th>
                  {canManage && <Th />}
                </tr>
              </thead>
              <tbody>
                {profiles.data.items.map((p) => (
                  <tr key={p.id}>
                    <Td className="font-medium">{p.name}</Td>
                    <Td className="text-xs">{p.powerUnit}</Td>
                    <Td className="text-xs">{p.timestamps}</Td>
                    <Td className="font-mono text-xs">{p.delimiter}</Td>
                    <Td className="text-right font-mono text-xs" >{Object.keys(p.tagMap ?? {}).length}</Td>
                    <Td className="text-xs">{formatDateTime(p.updatedAt ?? p.createdAt)}</Td>
                    {canManage && p.id && (
                      <Td className="text-right">
                        <ConfirmButton confirmLabel={`Delete ${p.name}`} onConfirm={() => remove.mutate(p.id!)}>Delete</ConfirmButton>
                      </Td>
                    )}
                  </tr>
                ))}
              </tbody>
            </Table>
          )}
        </div>
        {canManage && (
          <Panel title="New profile">
            <CreateProfileForm />
          </Panel>
        )}
      </div>
    </div>
  );
}
