import type { Request, Response, Router } from 'express';
import { authenticate, authorize } from '../auth/middleware';
import type { AppContext } from '../context';
import { strictRouter } from '../lib/strict-router';
import { auditActorOf } from '../services/audit';
import {
  changeMemberRole,
  invitationView,
  inviteMember,
  listMembers,
  listPendingInvitations,
  removeMember,
  revokeInvitation,
  userView,
} from '../services/members';

export function membersRouter(ctx: AppContext): Router {
  const r = strictRouter();
  const auth = authenticate(ctx);

  r.get('/v1/members', auth, authorize('members.read'), async (req, res) => {
    const page = await listMembers(ctx, req.principal!.tenantId, { cursor: req.query.cursor as string | undefined, limit: req.query.limit as number | undefined });
    res.json({ items: page.items.map(userView), nextCursor: page.nextCursor });
  });

  const invite = async (req: Request, res: Response) => {
    const { invitation } = await inviteMember(
      ctx,
      { tenantId: req.principal!.tenantId, email: req.body.email, role: req.body.role, invitedBy: req.principal!.userId ?? null },
      await auditActorOf(ctx, req.principal),
    );
    res.status(201).json(invitationView(invitation));
  };
  r.post('/v1/members', auth, authorize('members.manage'), invite);
  r.post('/v1/members/invitations', auth, authorize('members.manage'), invite);

  r.get('/v1/members/invitations', auth, authorize('members.read'), async (req, res) => {
    res.json({ items: (await listPendingInvitations(ctx, req.principal!.tenantId)).map(invitationView) });
  });

  r.delete('/v1/members/invitations/:id', auth, authorize('members.manage'), async (req, res) => {
    await revokeInvitation(ctx, req.principal!.tenantId, req.params.id as string);
    res.status(204).end();
  });

  r.patch('/v1/members/:id', auth, authorize('members.manage'), async (req, res) => {
    const user = await changeMemberRole(ctx, req.principal!.tenantId, req.params.id as string, req.body.role, await auditActorOf(ctx, req.principal));
    res.json(userView(user));
  });

  r.delete('/v1/members/:id', auth, authorize('members.manage'), async (req, res) => {
    await removeMember(ctx, req.principal!.tenantId, req.params.id as string, await auditActorOf(ctx, req.principal));
    res.status(204).end();
  });

  return r;
}
