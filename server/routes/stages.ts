import type { Router } from 'express';
import { z } from 'zod';
import {
  CreateStageSchema,
  ReorderStagesSchema,
  TemplateItemInputSchema,
  UpdateStageSchema,
  UpdateTemplateItemSchema,
} from '../../shared/schemas/assets';
import type { Deps } from '../deps';
import { pathId } from '../lib/ids';
import { RouteTable } from '../lib/routes';
import { currentUser } from '../middleware/auth';
import * as stages from '../services/stages';

const LEAD = ['lead'] as const;
const TEMPLATE_EDITORS = ['engineer', 'lead'] as const;
const ProgramQuery = z.strictObject({ programId: z.uuid('Not a valid id.') });

export function stageRoutes(_router: Router, deps: Deps, table: RouteTable) {
  table.add({ method: 'get', path: '/stages', access: 'user' }, async (req, res) => {
    const { programId } = ProgramQuery.parse(req.query);
    res.json(await stages.listStages(currentUser(req), programId));
  });
  table.add({ method: 'post', path: '/stages', access: LEAD }, async (req, res) => {
    const body = CreateStageSchema.parse(req.body);
    res.status(201).json(await stages.createStage(deps, currentUser(req), body));
  });
  table.add({ method: 'post', path: '/stages/reorder', access: LEAD }, async (req, res) => {
    const body = ReorderStagesSchema.parse(req.body);
    res.json(await stages.reorderStages(deps, currentUser(req), body));
  });
  table.add({ method: 'patch', path: '/stages/:id', access: LEAD }, async (req, res) => {
    const id = pathId(req.params.id, 'This stage');
    const body = UpdateStageSchema.parse(req.body);
    res.json(await stages.updateStage(deps, currentUser(req), id, body));
  });
  table.add({ method: 'delete', path: '/stages/:id', access: LEAD }, async (req, res) => {
    const id = pathId(req.params.id, 'This stage');
    await stages.deleteStage(deps, currentUser(req), id);
    res.status(204).end();
  });
  table.add({ method: 'get', path: '/stages/:id/template', access: 'user' }, async (req, res) => {
    const id = pathId(req.params.id, 'This stage');
    res.json(await stages.getTemplate(currentUser(req), id));
  });
  table.add({ method: 'post', path: '/stages/:id/template/items', access: TEMPLATE_EDITORS }, async (req, res) => {
    const id = pathId(req.params.id, 'This stage');
    const body = TemplateItemInputSchema.parse(req.body);
    res.status(201).json(await stages.addTemplateItem(deps, currentUser(req), id, body));
  });
  table.add({ method: 'patch', path: '/template-items/:id', access: TEMPLATE_EDITORS }, async (req, res) => {
    const id = pathId(req.params.id, 'This checklist item');
    const body = UpdateTemplateItemSchema.parse(req.body);
    res.json(await stages.updateTemplateItem(deps, currentUser(req), id, body));
  });
}
