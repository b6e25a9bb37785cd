import { IsNull, MoreThan, type EntityManager } from 'typeorm';
import type { AppContext } from '../context';
import { Invitation } from '../db/entities/invitation';
import { Tenant } from '../db/entities/tenant';
import { User } from '../db/entities/user';
import { pageNewestFirst, type PageQuery } from '../lib/pagination';
import { HttpProblem, notFound, validationProblem } from '../lib/problem';
import { TENANT_ROLES, type TenantRole } from '../lib/roles-and-scopes';
import { randomToken, sha256Hex } from '../lib/secret-tokens';
import { isUuid } from '../lib/uuid';
import { recordAudit, type AuditActor } from './audit';
import { composeMail, sendMail } from './mail';
import { assertPasswordAcceptable, hashPassword } from './passwords';
import { revokeUserSessions } from './sessions';

export const userView = (u: User) => ({
  id: u.id,
  email: u.email,
  name: u.name,
  role: u.role,
  tenantId: u.tenantId,
  createdAt: u.createdAt.toISOString(),
  lastSignInAt: u.lastSignInAt?.toISOString() ?? null,
});

export const invitationView = (i: Invitation) => ({
  id: i.id,
  email: i.email,
  role: i.role,
  createdAt: i.createdAt.toISOString(),
  expiresAt: i.expiresAt.toISOString(),
  invitedBy: i.invitedBy,
});

function conflict(detail: string, pointer: string) {
  return new HttpProblem({ status: 409, slug: 'conflict', title: 'Already exists', detail, errors: [{ pointer, message: 'already in use' }] });
}

/** A role a tenant member may hold; `operator` belongs to the service, never to a tenant. */
function checkedTenantRole(role: unknown): TenantRole {
  if (!TENANT_ROLES.includes(role as TenantRole)) throw validationProblem([{ pointer: '/role', message: `one of ${TENANT_ROLES.join(', ')}` }]);
  return role as TenantRole;
}

async function findUserByEmail(m: EntityManager, email: string) {
  return m.getRepository(User).createQueryBuilder('u').where('lower(u.email) = lower(:email)', { email }).getOne();
}

export function listMembers(ctx: AppContext, tenantId: string, opts: PageQuery) {
  const qb = ctx.db.getRepository(User).createQueryBuilder('u').where('u.tenant_id = :tenantId', { tenantId });
  return pageNewestFirst(qb, opts);
}

export function listPendingInvitations(ctx: AppContext, tenantId: string) {
  return ctx.db.getRepository(Invitation).find({
    where: { tenantId, acceptedAt: IsNull(), revokedAt: IsNull(), expiresAt: MoreThan(new Date()) },
    order: { createdAt: 'DESC' },
  });
}

export async function getMember(m: EntityManager, tenantId: string, id: string): Promise<User> {
  const user = isUuid(id) ? await m.findOneBy(User, { id, tenantId }) : null;
  if (!user) throw notFound(`Member ${id}`);
  return user;
}

async function assertNotLastOwner(m: EntityManager, tenantId: string, user: User) {
  if (user.role !== 'owner') return;
  // Lock the tenant's owners so two concurrent demotions cannot both see "another owner remains".
  const owners: { id: string }[] = await m.query(`SELECT id FROM users WHERE tenant_id = $1 AND role = 'owner' FOR UPDATE`, [tenantId]);
  if (owners.length <= 1) {
    throw new HttpProblem({
      status: 409,
      slug: 'last-owner',
      title: 'The last owner must stay',
      detail: `${user.email} is the only owner of this tenant; make another member owner first.`,
    });
  }
}

/** Creates a member directly (CLI, seed). Without a password the account can only be entered through a reset. */
export async function createMember(
  ctx: AppContext,
  m: EntityManager,
  input: { tenantId: string | null; email: string; role: User['role']; password?: string; name?: string },
): Promise<User> {
  if (await findUserByEmail(m, input.email)) throw conflict(`An account for ${input.email} already exists.`, '/email');
  if (input.password) assertPasswordAcceptable(input.password);
  const user = m.create(User, {
    tenantId: input.tenantId,
    email: input.email.trim(),
    name: input.name ?? '',
    role: input.role,
    passwordHash: input.password ? await hashPassword(ctx.config, input.password) : null,
    passwordChangedAt: input.password ? new Date() : null,
    lastSignInAt: null,
  });
  await m.insert(User, user);
  return m.findOneByOrFail(User, { id: user.id });
}

export async function changeMemberRole(ctx: AppContext, tenantId: string, id: string, requestedRole: TenantRole, actor: AuditActor): Promise<User> {
  const role = checkedTenantRole(requestedRole);
  return ctx.db.transaction(async (m) => {
    const user = await getMember(m, tenantId, id);
    if (user.role === role) return user;
    if (role !== 'owner') await assertNotLastOwner(m, tenantId, user);
    await recordAudit(m, { tenantId, action: 'role-changed', actor, target: user.email, details: { from: user.role, to: role } });
    await m.update(User, { id }, { role });
    await revokeUserSessions(m, id, 'role changed');
    return m.findOneByOrFail(User, { id });
  });
}

export async function removeMember(ctx: AppContext, tenantId: string, id: string, actor: AuditActor): Promise<void> {
  await ctx.db.transaction(async (m) => {
    const user = await getMember(m, tenantId, id);
    await assertNotLastOwner(m, tenantId, user);
    await recordAudit(m, { tenantId, action: 'member-removed', actor, target: user.email, details: { role: user.role } });
    await m.delete(User, { id });
  });
}

/**
 * Invites an address into a tenant. An address that already has an account in another tenant (or
 * is an operator's) gets the same answer as any other, so an invitation tells the inviter nothing
 * about other tenants: the invitation is recorded and listed like the rest, but the e-mail carries
 * no link, only a note that the address already has an account and cannot join a second tenant
 * with it. A member of the same tenant is a 409: the inviter can list the members anyway.
 */
export async function inviteMember(
  ctx: AppContext,
  input: { tenantId: string; email: string; role: TenantRole; invitedBy: string | null },
  actor: AuditActor,
): Promise<{ invitation: Invitation; link: string | null }> {
  const role = checkedTenantRole(input.role);
  const token = randomToken();
  const { invitation, tenant, addressTaken } = await ctx.db.transaction(async (m) => {
    const tenant = await m.findOneByOrFail(Tenant, { id: input.tenantId });
    const existing = await findUserByEmail(m, input.email);
    if (existing?.tenantId === input.tenantId) throw conflict(`${input.email} is already a member of this tenant.`, '/email');
    // A new invitation to the same address replaces the earlier ones.
    await m.update(Invitation, { tenantId: input.tenantId, email: input.email, acceptedAt: IsNull(), revokedAt: IsNull() }, { revokedAt: new Date() });
    const invitation = m.create(Invitation, {
      tenantId: input.tenantId,
      email: input.email.trim(),
      role,
      tokenHash: sha256Hex(token),
      invitedBy: input.invitedBy,
      expiresAt: new Date(Date.now() + ctx.config.invitationHours * 3_600_000),
      acceptedAt: null,
      revokedAt: null,
    });
    await m.insert(Invitation, invitation);
    await recordAudit(m, { tenantId: input.tenantId, action: 'member-invited', actor, target: invitation.email, details: { role } });
    return { invitation: await m.findOneByOrFail(Invitation, { id: invitation.id }), tenant, addressTaken: existing !== null };
  });
  if (addressTaken) {
    await sendMail(ctx, { to: [invitation.email], subject: `Invitation to ${tenant.name} on Gridwright`, ...addressTakenMail(ctx, tenant.name, role), tenantId: tenant.id, kind: 'invitation-address-taken' });
    return { invitation, link: null };
  }
  const mail = composeMail(ctx, {
    tenantName: tenant.name,
    heading: `You are invited to ${tenant.name} on Gridwright`,
    paragraphs: [
      `You have been invited to join ${tenant.name} as ${role}.`,
      `Open the link below to choose your password. It works once and expires on ${invitation.expiresAt.toISOString().slice(0, 16).replace('T', ' ')} UTC.`,
    ],
    link: { label: 'Accept the invitation', path: `/accept-invitation?token=${token}` },
  });
  await sendMail(ctx, { to: [invitation.email], subject: `Invitation to ${tenant.name} on Gridwright`, ...mail, tenantId: tenant.id, kind: 'invitation' });
  return { invitation, link: `${ctx.config.publicUrl}/accept-invitation?token=${token}` };
}

function addressTakenMail(ctx: AppContext, tenantName: string, role: TenantRole) {
  return composeMail(ctx, {
    tenantName,
    heading: `You are invited to ${tenantName} on Gridwright`,
    paragraphs: [
      `Someone at ${tenantName} invited this address to join as ${role}.`,
      'This address already has a Gridwright account, and an address belongs to one tenant, so it cannot join a second one. ' +
        `To work with ${tenantName}, ask them to invite another of your addresses. If you did not expect this, ignore this message; nothing changes.`,
    ],
    link: { label: 'Sign in to your account', path: '/sign-in' },
  });
}

/** Withdraws an invitation not yet accepted; 404 for one of another tenant, accepted or already withdrawn. */
export async function revokeInvitation(ctx: AppContext, tenantId: string, id: string): Promise<void> {
  const result = await ctx.db
    .getRepository(Invitation)
    .createQueryBuilder()
    .update()
    .set({ revokedAt: () => 'now()' })
    .where('id = :id AND tenant_id = :tenantId AND accepted_at IS NULL AND revoked_at IS NULL', { id, tenantId })
    .execute();
  if (!result.affected) throw notFound(`Invitation ${id}`);
}

const invalidToken = (what: string) =>
  new HttpProblem({
    status: 400,
    slug: 'invalid-token',
    title: 'Link not valid',
    detail: `This ${what} link is unknown, already used or expired; ask for a new one.`,
    errors: [{ pointer: '/token', message: 'unknown, used or expired' }],
  });

export async function acceptInvitation(ctx: AppContext, input: { token: string; password: string; name?: string }): Promise<User> {
  assertPasswordAcceptable(input.password);
  const passwordHash = await hashPassword(ctx.config, input.password);
  return ctx.db.transaction(async (m) => {
    // The conditional update is what makes the token single-use, even under concurrent accepts.
    const [claimed] = (await m.query(
      `UPDATE invitations SET accepted_at = now()
       WHERE token_hash = $1 AND accepted_at IS NULL AND revoked_at IS NULL AND expires_at > now()
       RETURNING id, tenant_id AS "tenantId", email, role`,
      [sha256Hex(input.token)],
    )) as [Invitation[], number];
    const invitation = claimed[0];
    if (!invitation) throw invalidToken('invitation');
    const user = await createMember(ctx, m, { tenantId: invitation.tenantId, email: invitation.email, role: invitation.role, name: input.name });
    await m.update(User, { id: user.id }, { passwordHash, passwordChangedAt: new Date() });
    await recordAudit(m, { tenantId: invitation.tenantId, action: 'member-joined', actor: { userId: user.id, email: user.email }, target: user.email, details: { role: user.role } });
    return user;
  });
}

export { invalidToken };
