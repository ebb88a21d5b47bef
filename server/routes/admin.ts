import type { Router } from 'express';
import { z } from 'zod';
import { CreateProgramSchema, InviteUserSchema, SetMembersSchema, UpdateUserSchema } from '../../shared/schemas/admin';
import type { Deps } from '../deps';
import { pathId } from '../lib/ids';
import { RouteTable } from '../lib/routes';
import { currentUser } from '../middleware/auth';
import * as admin from '../services/admin';

const ADMIN = ['admin'] as const;
const IdParam = z.object({ id: z.string().max(64) });

export function adminRoutes(_router: Router, deps: Deps, table: RouteTable) {
  table.add({ method: 'get', path: '/admin/users', access: ADMIN }, async (req, res) => {
    res.json({ users: await admin.listUsers(currentUser(req)) });
  });
  table.add({ method: 'post', path: '/admin/users', access: ADMIN }, async (req, res) => {
    const body = InviteUserSchema.parse(req.body);
    res.status(201).json(await admin.inviteUser(deps, currentUser(req), body));
  });
  table.add({ method: 'patch', path: '/admin/users/:id', access: ADMIN }, async (req, res) => {
    const { id } = IdParam.parse(req.params);
    const body = UpdateUserSchema.parse(req.body);
    res.json(await admin.updateUser(deps, currentUser(req), id, body));
  });
  table.add({ method: 'get', path: '/admin/programs', access: ADMIN }, async (req, res) => {
    res.json({ programs: await admin.listPrograms(currentUser(req)) });
  });
  table.add({ method: 'post', path: '/admin/programs', access: ADMIN }, async (req, res) => {
    const body = CreateProgramSchema.parse(req.body);
    res.status(201).json(await admin.createProgram(deps, currentUser(req), body));
  });
  table.add({ method: 'get', path: '/admin/programs/:id', access: ADMIN }, async (req, res) => {
    const { id } = IdParam.parse(req.params);
    res.json(await admin.getProgram(currentUser(req), id));
  });
  // Any member of the program (not only its admins) reads who else is in it, for the pickers.
  table.add({ method: 'get', path: '/programs/:id/members', access: 'user' }, async (req, res) => {
    res.json({ items: await admin.listProgramMembers(deps, currentUser(req), pathId(req.params.id, 'This program')) });
  });
  table.add({ method: 'put', path: '/admin/programs/:id/members', access: ADMIN }, async (req, res) => {
    const { id } = IdParam.parse(req.params);
    const body = SetMembersSchema.parse(req.body);
    res.json(await admin.setMembers(deps, currentUser(req), id, body.userIds));
  });
}
