import type { Router } from 'express';
import { FINDING_MEMBER_ROLES } from '../../shared/domain/finding-workflow';
import {
  AcceptProposalSchema,
  AssignmentListQuerySchema,
  CancelAssignmentSchema,
  CheckInSchema,
  CheckOutSchema,
  CreateAssignmentSchema,
  CreateProposalSchema,
  DriverListQuerySchema,
  SolveAssignmentSchema,
  UpdateAssignmentSchema,
  UpdateDriverProfileSchema,
  UtilisationQuerySchema,
} from '../../shared/schemas/fleet';
import type { Deps } from '../deps';
import { pathId } from '../lib/ids';
import { RouteTable } from '../lib/routes';
import { currentUser } from '../middleware/auth';
import { idempotent } from '../middleware/idempotency';
import { solveAssignment } from '../services/assignment-solver';
import * as fleet from '../services/fleet';
import { acceptProposal, fleetUtilisation, proposeAssignments } from '../services/fleet-planning';

/**
 * Fleet (PRODUCT.md section 3E, issue 6). Any member reads the roster, the assignments and the
 * utilisation of their programs; coordinators and leads keep the roster, book, change, cancel and
 * ask for proposals; the assigned driver (or a coordinator or lead) checks a vehicle out and in,
 * which the service checks since the driver may hold any working role. Another program's
 * objects answer 404. A stage's minimum driving level is set with PATCH /api/stages/:id.
 */
export function fleetRoutes(_router: Router, deps: Deps, table: RouteTable) {
  const MANAGERS = fleet.FLEET_MANAGERS;
  const once = idempotent(deps);

  table.add({ method: 'get', path: '/drivers', access: 'user' }, async (req, res) => {
    const query = DriverListQuerySchema.parse(req.query);
    res.json(await fleet.listDrivers(deps, currentUser(req), query));
  });

  table.add({ method: 'put', path: '/drivers/:id', access: MANAGERS }, async (req, res) => {
    const id = pathId(req.params.id, 'This person');
    const body = UpdateDriverProfileSchema.parse(req.body);
    res.json(await fleet.updateDriverProfile(deps, currentUser(req), id, body));
  });

  table.add({ method: 'get', path: '/assignments', access: 'user' }, async (req, res) => {
    const query = AssignmentListQuerySchema.parse(req.query);
    res.json(await fleet.listAssignments(deps, currentUser(req), query));
  });

  table.add({ method: 'post', path: '/assignments', access: MANAGERS }, once, async (req, res) => {
    const body = CreateAssignmentSchema.parse(req.body);
    res.status(201).json(await fleet.createAssignment(deps, currentUser(req), body));
  });

  table.add({ method: 'get', path: '/assignments/:id', access: 'user' }, async (req, res) => {
    res.json(await fleet.getAssignment(deps, currentUser(req), pathId(req.params.id, 'This assignment')));
  });

  table.add({ method: 'patch', path: '/assignments/:id', access: MANAGERS }, async (req, res) => {
    const id = pathId(req.params.id, 'This assignment');
    const body = UpdateAssignmentSchema.parse(req.body);
    res.json(await fleet.updateAssignment(deps, currentUser(req), id, body));
  });

  table.add({ method: 'post', path: '/assignments/:id/cancel', access: MANAGERS }, async (req, res) => {
    const id = pathId(req.params.id, 'This assignment');
    const body = CancelAssignmentSchema.parse(req.body);
    res.json(await fleet.cancelAssignment(deps, currentUser(req), id, body));
  });

  table.add({ method: 'post', path: '/assignments/:id/check-out', access: FINDING_MEMBER_ROLES }, once, async (req, res) => {
    const id = pathId(req.params.id, 'This assignment');
    const body = CheckOutSchema.parse(req.body);
    res.json(await fleet.checkOut(deps, currentUser(req), id, body));
  });

  table.add({ method: 'post', path: '/assignments/:id/check-in', access: FINDING_MEMBER_ROLES }, once, async (req, res) => {
    const id = pathId(req.params.id, 'This assignment');
    const body = CheckInSchema.parse(req.body);
    res.json(await fleet.checkIn(deps, currentUser(req), id, body));
  });

  table.add({ method: 'get', path: '/assignments/:id/history', access: 'user' }, async (req, res) => {
    res.json(await fleet.assignmentHistory(deps, currentUser(req), pathId(req.params.id, 'This assignment')));
  });

  table.add({ method: 'get', path: '/fleet/utilisation', access: 'user' }, async (req, res) => {
    const query = UtilisationQuerySchema.parse(req.query);
    res.json(await fleetUtilisation(deps, currentUser(req), query));
  });

  table.add({ method: 'post', path: '/fleet/proposals', access: MANAGERS }, async (req, res) => {
    const body = CreateProposalSchema.parse(req.body);
    res.json(await proposeAssignments(deps, currentUser(req), body));
  });

  table.add({ method: 'post', path: '/fleet/proposals/accept', access: MANAGERS }, async (req, res) => {
    const body = AcceptProposalSchema.parse(req.body);
    res.status(201).json(await acceptProposal(deps, currentUser(req), body));
  });

  // A calculator: holds no program's data, so any signed-in user may call it.
  table.add({ method: 'post', path: '/calc/assignment', access: 'user' }, async (req, res) => {
    const { costs } = SolveAssignmentSchema.parse(req.body);
    res.json(solveAssignment(costs));
  });
}
