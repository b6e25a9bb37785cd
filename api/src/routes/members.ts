import { Router, type Request } from 'express';
import { authenticate, authorize } from '../auth/middleware';
import type { AppContext } from '../context';
import { Invitation } from '../db/entities/invitation';
import { User } from '../db/entities/user';
import { notFound } from '../lib/problem';
import { actorOf } from '../services/audit';
import { changeMemberRole, invitationView, inviteMember, listMembers, listPendingInvitations, removeMember, userView } from '../services/members';

async function actorFor(ctx: AppContext, req: Request) {
  const email = req.principal?.userId ? (await ctx.db.getRepository(User).findOneBy({ id: req.principal.userId }))?.email : null;
  return actorOf(req.principal, email);
}

export function membersRouter(ctx: AppContext): Router {
  const r = Router();
  const auth = authenticate(ctx);

  r.get('/v1/members', auth, authorize('members.read'), async (req, res) => {
    const page = await listMembers(ctx, req.principal!.tenantId, { cursor: req.query.cursor as string | undefined, limit: req.query.limit as number | undefined });
    res.json({ items: page.items.map(userView), nextCursor: page.nextCursor });
  });

  const invite = async (req: Request, res: import('express').Response) => {
    const { invitation } = await inviteMember(
      ctx,
      { tenantId: req.principal!.tenantId, email: req.body.email, role: req.body.role, invitedBy: req.principal!.userId ?? null },
      await actorFor(ctx, req),
    );
    res.status(201).json(invitationView(invitation));
  };
  r.post('/v1/members', auth, authorize('members.manage'), invite);
  r.post('/v1/members/invitations', auth, authorize('members.manage'), invite);

  r.get('/v1/members/invitations', auth, authorize('members.read'), async (req, res) => {
    res.json({ items: (await listPendingInvitations(ctx, req.principal!.tenantId)).map(invitationView) });
  });

  r.delete('/v1/members/invitations/:id', auth, authorize('members.manage'), async (req, res) => {
    const result = await ctx.db
      .getRepository(Invitation)
      .createQueryBuilder()
      .update()
      .set({ revokedAt: () => 'now()' })
      .where('id = :id AND tenant_id = :tenantId AND accepted_at IS NULL AND revoked_at IS NULL', { id: req.params.id, tenantId: req.principal!.tenantId })
      .execute();
    if (!result.affected) throw notFound(`Invitation ${req.params.id}`);
    res.status(204).end();
  });

  r.patch('/v1/members/:id', auth, authorize('members.manage'), async (req, res) => {
    const user = await changeMemberRole(ctx, req.principal!.tenantId, req.params.id as string, req.body.role, await actorFor(ctx, req));
    res.json(userView(user));
  });

  r.delete('/v1/members/:id', auth, authorize('members.manage'), async (req, res) => {
    await removeMember(ctx, req.principal!.tenantId, req.params.id as string, await actorFor(ctx, req));
    res.status(204).end();
  });

  return r;
}

export { actorFor };
