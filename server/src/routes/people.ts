import { z } from 'zod';
import { needs } from '../auth/permissions.ts';
import type { AppContext } from '../context.ts';
import { currentUser, type GuardedRouter } from '../http/routes.ts';
import { parse } from '../http/validate.ts';
import type { Mailer } from '../mail/mailer.ts';
import { emailSchema, invitePerson, listPeople, resendInvitation, roleSchema, updatePerson } from '../services/people.ts';

const idParam = z.object({ id: z.coerce.number().int().positive() });

export function registerPeopleRoutes(api: GuardedRouter, ctx: AppContext, mailer: Mailer): void {
  const deps = { sequelize: ctx.sequelize, mailer, publicUrl: ctx.config.publicUrl };
  const manage = needs('people:manage');

  api.route('get', '/people', manage, async (_req, res) => {
    res.json({ people: await listPeople() });
  });

  api.route('post', '/people/invitations', manage, async (req, res) => {
    const body = parse(
      z.object({ email: emailSchema, displayName: z.string().trim().min(1, 'Enter a name.').max(200), role: roleSchema }),
      req.body,
      'body',
    );
    res.status(201).json({ person: await invitePerson(deps, body, currentUser(req), req.ip ?? null) });
  });

  api.route('patch', '/people/:id', manage, async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    const body = parse(
      z
        .object({ role: roleSchema.optional(), active: z.boolean().optional(), version: z.number().int().nonnegative() })
        .refine((b) => b.role !== undefined || b.active !== undefined, 'Change the role or the status.'),
      req.body,
      'body',
    );
    res.json({ person: await updatePerson(ctx.sequelize, id, body, currentUser(req), req.ip ?? null) });
  });

  api.route('post', '/people/:id/invitation', manage, async (req, res) => {
    const { id } = parse(idParam, req.params, 'path');
    await resendInvitation(deps, id, currentUser(req), req.ip ?? null);
    res.status(202).json({ sent: true });
  });
}
