import type { Router } from 'express';
import {
  CreateGateReviewSchema,
  GateActionListQuerySchema,
  GateDecisionSchema,
  GateReviewListQuerySchema,
  SetTargetDateSchema,
  UpdateGateActionSchema,
  UpdateGateReviewSchema,
} from '../../shared/schemas/readiness';
import type { Deps } from '../deps';
import { pathId } from '../lib/ids';
import { RouteTable } from '../lib/routes';
import { currentUser } from '../middleware/auth';
import * as gates from '../services/gate-reviews';
import * as readiness from '../services/readiness';

/** Leads run gate reviews and set gate target dates (PRODUCT.md section 2). */
const LEAD = ['lead'] as const;
/** Anyone who works in a program may be an action's owner; the service lets the owner or a lead move it. */
const ACTION_MOVERS = ['technician', 'engineer', 'coordinator', 'driver', 'lead'] as const;

/**
 * Readiness, stage roll-ups, trend and target dates, gate reviews and their actions (issue 7;
 * PRODUCT.md sections 3F and 4). Reading is open to every member of the program; objects of
 * another program answer 404. Scoping is checked before the body is read, so a stranger learns
 * nothing from a 400; a decided review answers 409 to any change, whatever the body.
 */
export function readinessRoutes(_router: Router, deps: Deps, table: RouteTable) {
  table.add({ method: 'get', path: '/assets/:id/readiness', access: 'user' }, async (req, res) => {
    res.json(await readiness.assetReadiness(deps, currentUser(req), pathId(req.params.id, 'This asset')));
  });

  table.add({ method: 'get', path: '/programs/:id/readiness', access: 'user' }, async (req, res) => {
    res.json(await readiness.programReadiness(deps, currentUser(req), pathId(req.params.id, 'This program')));
  });

  table.add({ method: 'get', path: '/stages/:id/trend', access: 'user' }, async (req, res) => {
    res.json(await readiness.stageTrend(deps, currentUser(req), pathId(req.params.id, 'This stage')));
  });

  table.add({ method: 'put', path: '/stages/:id/target-date', access: LEAD }, async (req, res) => {
    const user = currentUser(req);
    const id = pathId(req.params.id, 'This stage');
    await readiness.visibleStage(user, id);
    res.json(await readiness.setTargetDate(deps, user, id, SetTargetDateSchema.parse(req.body ?? {})));
  });

  table.add({ method: 'get', path: '/gate-reviews', access: 'user' }, async (req, res) => {
    res.json(await gates.listReviews(deps, currentUser(req), GateReviewListQuerySchema.parse(req.query)));
  });

  table.add({ method: 'post', path: '/gate-reviews', access: LEAD }, async (req, res) => {
    res.status(201).json(await gates.openReview(deps, currentUser(req), CreateGateReviewSchema.parse(req.body ?? {})));
  });

  table.add({ method: 'get', path: '/gate-reviews/:id', access: 'user' }, async (req, res) => {
    res.json(await gates.getReview(deps, currentUser(req), pathId(req.params.id, 'This gate review')));
  });

  table.add({ method: 'patch', path: '/gate-reviews/:id', access: LEAD }, async (req, res) => {
    const user = currentUser(req);
    const id = pathId(req.params.id, 'This gate review');
    await gates.assertOpenReview(deps, user, id);
    res.json(await gates.updateReview(deps, user, id, UpdateGateReviewSchema.parse(req.body ?? {})));
  });

  table.add({ method: 'post', path: '/gate-reviews/:id/decision', access: LEAD }, async (req, res) => {
    const user = currentUser(req);
    const id = pathId(req.params.id, 'This gate review');
    await gates.assertOpenReview(deps, user, id);
    res.json(await gates.decideReview(deps, user, id, GateDecisionSchema.parse(req.body ?? {})));
  });

  table.add({ method: 'get', path: '/gate-actions', access: 'user' }, async (req, res) => {
    res.json(await gates.listActions(deps, currentUser(req), GateActionListQuerySchema.parse(req.query)));
  });

  table.add({ method: 'patch', path: '/gate-actions/:id', access: ACTION_MOVERS }, async (req, res) => {
    const user = currentUser(req);
    const id = pathId(req.params.id, 'This gate action');
    await gates.visibleAction(deps, user, id);
    res.json(await gates.updateAction(deps, user, id, UpdateGateActionSchema.parse(req.body ?? {})));
  });
}
