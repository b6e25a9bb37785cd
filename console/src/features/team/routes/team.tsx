import { ConfirmButton } from '@/components/confirm-button';
import { Table, Td, Th } from '@/components/data-table';
import { PageHeader, Panel } from '@/components/page-header';
import { ProblemAlert } from '@/components/problem-alert';
import { EmptyState, Loading } from '@/components/states';
import { formatDateTime } from '@/lib/format';
import { usePermission, useSession } from '@/lib/session';
import { tenantRoles, useChangeRole, useInvitations, useMembers, useRemoveMember, useWithdrawInvitation, type TenantRole } from '../api';
import { InviteForm } from '../components/invite-form';

export function TeamRoute() {
  const members = useMembers();
  const invitations = useInvitations();
  const changeRole = useChangeRole();
  const remove = useRemoveMember();
  const withdraw = useWithdrawInvitation();
  const canManage = usePermission('members.manage');
  const { data: session } = useSession();
  return (
    <div>
      <PageHeader title="Team" subtitle="Who can use this tenant, and what their role lets them do. A role change ends that person's sessions." />
      <div className="grid gap-4 xl:grid-cols-[1fr_20rem]">
        <div className="min-w-0 space-y-4">
          <ProblemAlert error={changeRole.error ?? remove.error ?? withdraw.error} />
          {members.isPending ? (
            <Loading />
          ) : members.error ? (
            <ProblemAlert error={members.error} />
          ) : (
            <Table label="Members">
              <thead>
                <tr>
                  <Th>Name</Th>
                  <Th>E-mail</Th>
                  <Th>Role</Th>
                  <Th>Last sign-in</Th>
                  <Th>Joined</Th>
                  {canManage && <Th />}
                </tr>
              </thead>
              <tbody>
                {members.data.items.map((m) => {
                  const self = m.id === session?.user.id;
                  return (
                    <tr key={m.id}>
                      <Td className="font-medium">
                        {m.name || '—'}
                        {self && <span className="ml-1 text-xs text-ash-500">(you)</span>}
                      </Td>
                      <Td className="text-xs">{m.email}</Td>
                      <Td>
                        {canManage && !self && m.role !== 'operator' ? (
                          <select
                            aria-label={`Role of ${m.email}`}
                            className="rounded border border-ash-300 bg-white px-1.5 py-0.5 text-xs"
                            value={m.role}
                            onChange={(e) => changeRole.mutate({ id: m.id, role: e.target.value as TenantRole })}
                          >
                            {tenantRoles.map((r) => (
                              <option key={r} value={r}>
                                {r}
                              </option>
                            ))}
                          </select>
                        ) : (
                          <span className="text-xs">{m.role}</span>
                        )}
                      </Td>
                      <Td className="text-xs">{m.lastSignInAt ? formatDateTime(m.lastSignInAt) : 'never'}</Td>
                      <Td className="text-xs">{formatDateTime(m.createdAt)}</Td>
                      {canManage && (
                        <Td className="text-right">
                          {!self && (
                            <ConfirmButton confirmLabel={`Remove ${m.email}`} onConfirm={() => remove.mutate(m.id)}>
                              Remove
                            </ConfirmButton>
                          )}
                        </Td>
                      )}
                    </tr>
                  );
                })}
              </tbody>
            </Table>
          )}
          <Panel title="Pending invitations">
            {invitations.isPending ? (
              <Loading />
            ) : invitations.error ? (
              <ProblemAlert error={invitations.error} />
            ) : invitations.data.items.length === 0 ? (
              <EmptyState title="No pending invitations" />
            ) : (
              <ul className="divide-y divide-ash-100 text-[13px]">
                {invitations.data.items.map((i) => (
                  <li key={i.id} className="flex items-center gap-3 py-1.5">
                    <span className="flex-1">{i.email}</span>
                    <span className="text-xs text-ash-500">{i.role}</span>
                    <span className="text-xs text-ash-500">expires {formatDateTime(i.expiresAt)}</span>
                    {canManage && (
                      <ConfirmButton confirmLabel="Withdraw it" onConfirm={() => withdraw.mutate(i.id)}>
                        Withdraw
                      </ConfirmButton>
                    )}
                  </li>
                ))}
              </ul>
            )}
          </Panel>
        </div>
        {canManage && (
          <Panel title="Invite someone">
            <InviteForm />
          </Panel>
        )}
      </div>
    </div>
  );
}
