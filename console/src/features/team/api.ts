import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api, unwrap, type Schemas } from '@/lib/api-client';

export type Member = Schemas['Member'];
export type TenantRole = Schemas['InvitationRequest']['role'];
export const tenantRoles: TenantRole[] = ['owner', 'developer', 'viewer'];

export const listMembers = () => unwrap(api.GET('/v1/members', { params: { query: { limit: 200 } } }));
export const getMembersQueryOptions = () => queryOptions({ queryKey: ['members', 'list'], queryFn: listMembers });
export const useMembers = () => useQuery(getMembersQueryOptions());

export const listInvitations = () => unwrap(api.GET('/v1/members/invitations'));
export const getInvitationsQueryOptions = () => queryOptions({ queryKey: ['members', 'invitations'], queryFn: listInvitations });
export const useInvitations = () => useQuery(getInvitationsQueryOptions());

function useMembersMutation<I, O>(fn: (input: I) => Promise<O>) {
  const queryClient = useQueryClient();
  return useMutation({ mutationFn: fn, onSuccess: () => queryClient.invalidateQueries({ queryKey: ['members'] }) });
}

export const useInviteMember = () =>
  useMembersMutation((body: Schemas['InvitationRequest']) => unwrap(api.POST('/v1/members/invitations', { body })));

export const useChangeRole = () =>
  useMembersMutation(({ id, role }: { id: string; role: TenantRole }) => unwrap(api.PATCH('/v1/members/{id}', { params: { path: { id } }, body: { role } })));

export const useRemoveMember = () => useMembersMutation((id: string) => unwrap(api.DELETE('/v1/members/{id}', { params: { path: { id } } })));

export const useWithdrawInvitation = () =>
  useMembersMutation((id: string) => unwrap(api.DELETE('/v1/members/invitations/{id}', { params: { path: { id } } })));
