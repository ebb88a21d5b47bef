import { QueryTypes, UniqueConstraintError, type Transaction } from 'sequelize';
import { isPastDueDate, utcDate } from '../../shared/domain/finding-workflow';
import { byText } from '../../shared/domain/readiness';
import type { Role } from '../../shared/schemas/auth';
import {
  GATE_ACTION_STATUS_LABELS,
  READINESS_RESULT_LABELS,
  type Attendee,
  type FrozenRollup,
  type GateAction,
  type GateActionListQuerySchema,
  type GateActionStatus,
  type GateDecisionSchema,
  type GateReview,
  type GateReviewListQuerySchema,
  type GateReviewSummary,
  type CreateGateReviewSchema,
  type ReadinessResult,
  type UpdateGateActionSchema,
  type UpdateGateReviewSchema,
} from '../../shared/schemas/readiness';
import type { z } from 'zod';
import type { Deps } from '../deps';
import { AppError, conflict, notFound } from '../lib/app-error';
import { isUuid } from '../lib/ids';
import type { SessionUser } from '../middleware/auth';
import { recordHistory } from './history';
import { enqueueMail } from './outbox';
import { stageFigures, visibleStage } from './readiness';
import { assertMember } from './stages';

type CreateReview = z.output<typeof CreateGateReviewSchema>;
type UpdateReview = z.output<typeof UpdateGateReviewSchema>;
type Decision = z.output<typeof GateDecisionSchema>;
type UpdateAction = z.output<typeof UpdateGateActionSchema>;
type ActionListQuery = z.output<typeof GateActionListQuerySchema>;
type ReviewListQuery = z.output<typeof GateReviewListQuerySchema>;

/** Who may move a gate action besides its owner: the leads, who run gate reviews and track what they decided (PRODUCT.md section 2). */
export const ACTION_MANAGERS: readonly Role[] = ['lead'];
export const GATE_MAIL_KIND = 'gate-decision';

const fieldError = (field: string, message: string, code = 'request/invalid', status = 400) =>
  new AppError(status, code, `${field}: ${message}`, { fields: { [field]: message } });
const decided = (current: unknown) =>
  new AppError(409, 'gate/decided', 'This gate review is decided and cannot be changed. Open a new review that corrects it.', { current });

export const gateReviewUrl = (deps: Deps, id: string) => `${deps.config.publicUrl}/gates/${id}`;

// ---- Reading ------------------------------------------------------------------------------

type ReviewRow = {
  id: string;
  program_id: string;
  stage_id: string;
  stage_name: string;
  opened_by: string | null;
  opened_by_name: string | null;
  opened_at: Date;
  frozen_rollup: FrozenRollup;
  attendees: Attendee[];
  notes: string;
  decision: ReadinessResult | null;
  decision_notes: string;
  decided_by: string | null;
  decided_by_name: string | null;
  decided_at: Date | null;
  corrects_review_id: string | null;
  corrected_by: string | null;
  version: number;
};

type ActionRow = {
  id: string;
  review_id: string;
  program_id: string;
  stage_id: string;
  stage_name: string;
  decided_at: Date | null;
  title: string;
  owner_id: string | null;
  owner_name: string | null;
  due_date: string;
  status: GateActionStatus;
  note: string;
  updated_at: Date;
  updated_by: string | null;
  updated_by_name: string | null;
  version: number;
};

const REVIEW_SELECT = `
  SELECT r.id, r.program_id, r.stage_id, s.name AS stage_name, r.opened_by, ob.name AS opened_by_name, r.opened_at,
         r.frozen_rollup, r.attendees, r.notes, r.decision, r.decision_notes, r.decided_by, db.name AS decided_by_name,
         r.decided_at, r.corrects_review_id, (SELECT c.id FROM gate_reviews c WHERE c.corrects_review_id = r.id) AS corrected_by, r.version
    FROM gate_reviews r
    JOIN stages s ON s.id = r.stage_id
    LEFT JOIN users ob ON ob.id = r.opened_by
    LEFT JOIN users db ON db.id = r.decided_by`;

const ACTION_SELECT = `
  SELECT a.id, a.review_id, a.program_id, r.stage_id, s.name AS stage_name, r.decided_at, a.title, a.owner_id, u.name AS owner_name,
         a.due_date::text AS due_date, a.status, a.note, a.updated_at, a.updated_by, ub.name AS updated_by_name, a.version
    FROM gate_actions a
    JOIN gate_reviews r ON r.id = a.review_id
    JOIN stages s ON s.id = r.stage_id
    LEFT JOIN users u ON u.id = a.owner_id
    LEFT JOIN users ub ON ub.id = a.updated_by`;

function actionDto(a: ActionRow, asOf = new Date()): GateAction {
  return {
    id: a.id,
    reviewId: a.review_id,
    programId: a.program_id,
    stageId: a.stage_id,
    stageName: a.stage_name,
    reviewDecidedAt: a.decided_at ? a.decided_at.toISOString() : null,
    title: a.title,
    owner: a.owner_id ? { id: a.owner_id, name: a.owner_name ?? '' } : null,
    dueDate: a.due_date,
    status: a.status,
    note: a.note,
    overdue: a.status !== 'done' && a.due_date < utcDate(asOf),
    updatedAt: a.updated_at.toISOString(),
    updatedBy: a.updated_by ? { id: a.updated_by, name: a.updated_by_name ?? '' } : null,
    version: a.version,
  };
}

async function loadActions(deps: Deps, reviewIds: string[], transaction?: Transaction): Promise<Map<string, GateAction[]>> {
  const out = new Map<string, GateAction[]>();
  if (!reviewIds.length) return out;
  const rows = await deps.sequelize.query<ActionRow>(`${ACTION_SELECT} WHERE a.review_id = ANY($1::uuid[]) ORDER BY a.position, a.id`, {
    bind: [reviewIds],
    type: QueryTypes.SELECT,
    transaction,
  });
  for (const row of rows) out.set(row.review_id, [...(out.get(row.review_id) ?? []), actionDto(row)]);
  return out;
}

function reviewDto(r: ReviewRow, actions: GateAction[]): GateReview {
  return {
    id: r.id,
    programId: r.program_id,
    stageId: r.stage_id,
    stageName: r.stage_name,
    openedBy: r.opened_by ? { id: r.opened_by, name: r.opened_by_name ?? '' } : null,
    openedAt: r.opened_at.toISOString(),
    frozen: r.frozen_rollup,
    attendees: r.attendees,
    notes: r.notes,
    decision: r.decision,
    decisionNotes: r.decision_notes,
    decidedBy: r.decided_by ? { id: r.decided_by, name: r.decided_by_name ?? '' } : null,
    decidedAt: r.decided_at ? r.decided_at.toISOString() : null,
    correctsReviewId: r.corrects_review_id,
    correctedByReviewId: r.corrected_by,
    actions,
    version: r.version,
  };
}

async function reviewById(deps: Deps, id: string, transaction?: Transaction): Promise<GateReview | null> {
  const [row] = await deps.sequelize.query<ReviewRow>(`${REVIEW_SELECT} WHERE r.id = $1`, { bind: [id], type: QueryTypes.SELECT, transaction });
  if (!row) return null;
  return reviewDto(row, (await loadActions(deps, [row.id], transaction)).get(row.id) ?? []);
}

/** The review's program when the user belongs to it (locked for update in a transaction); otherwise 404. */
async function visibleReview(user: SessionUser, deps: Deps, id: string, transaction?: Transaction) {
  const [row] = await deps.sequelize.query<{ id: string; program_id: string; stage_id: string; decision: ReadinessResult | null; version: number }>(
    `SELECT id, program_id, stage_id, decision, version FROM gate_reviews WHERE id = $1 ${transaction ? 'FOR UPDATE' : ''}`,
    { bind: [id], type: QueryTypes.SELECT, transaction },
  );
  if (!row || !user.programIds.includes(row.program_id)) throw notFound('This gate review');
  return row;
}

/** 404 for a stranger, 409 once decided: the check made before a change's body is read. */
export async function assertOpenReview(deps: Deps, user: SessionUser, id: string): Promise<void> {
  const row = await visibleReview(user, deps, id);
  if (row.decision) throw decided(await reviewById(deps, id));
}

export async function getReview(deps: Deps, user: SessionUser, id: string): Promise<GateReview> {
  await visibleReview(user, deps, id);
  return (await reviewById(deps, id))!;
}

export async function listReviews(deps: Deps, user: SessionUser, q: ReviewListQuery): Promise<{ items: GateReviewSummary[] }> {
  assertMember(user, q.programId, 'This program');
  if (q.stageId) {
    const stage = await visibleStage(user, q.stageId);
    if (stage.programId !== q.programId) throw notFound('This stage');
  }
  const rows = await deps.sequelize.query<ReviewRow>(
    `${REVIEW_SELECT} WHERE r.program_id = $1 AND ($2::uuid IS NULL OR r.stage_id = $2::uuid) ORDER BY r.opened_at DESC, r.id`,
    { bind: [q.programId, q.stageId ?? null], type: QueryTypes.SELECT },
  );
  const actions = await loadActions(deps, rows.map((r) => r.id));
  return {
    items: rows.map((r) => {
      const { frozen, ...rest } = reviewDto(r, actions.get(r.id) ?? []);
      return { ...rest, meanScore: frozen.stage.meanScore, counts: frozen.stage.counts };
    }),
  };
}

// ---- Opening and editing ------------------------------------------------------------------

/** Attendees as given: a user id must be a member of the program (its name is looked up); anything else is a name. */
async function resolveAttendees(deps: Deps, programId: string, given: string[], transaction?: Transaction): Promise<Attendee[]> {
  const ids = [...new Set(given.filter(isUuid).map((id) => id.toLowerCase()))];
  const members = ids.length
    ? await deps.sequelize.query<{ id: string; name: string }>(
        `SELECT u.id, u.name FROM users u JOIN program_members pm ON pm.user_id = u.id AND pm.program_id = $1 WHERE u.id = ANY($2::uuid[])`,
        { bind: [programId, ids], type: QueryTypes.SELECT, transaction },
      )
    : [];
  const byId = new Map(members.map((m) => [m.id, m.name]));
  const seen = new Set<string>();
  const out: Attendee[] = [];
  given.forEach((value, i) => {
    if (isUuid(value)) {
      const id = value.toLowerCase();
      const name = byId.get(id);
      if (name === undefined) throw fieldError(`attendees.${i}`, 'Choose a member of this program, or enter a name.');
      if (!seen.has(id)) out.push({ userId: id, name });
      seen.add(id);
    } else {
      out.push({ userId: null, name: value });
    }
  });
  return out;
}

/** Opens a review of a stage: its roll-up, blockers and each asset's figure frozen now. */
export async function openReview(deps: Deps, user: SessionUser, input: CreateReview, asOf = new Date()): Promise<GateReview> {
  const stage = await visibleStage(user, input.stageId);
  try {
    return await deps.sequelize.transaction(async (transaction) => {
      if (input.correctsReviewId) {
        const corrected = await visibleReview(user, deps, input.correctsReviewId, transaction);
        if (corrected.program_id !== stage.programId) throw notFound('This gate review');
        if (corrected.stage_id !== stage.id) throw fieldError('correctsReviewId', 'A correction is a review of the same stage.');
        if (!corrected.decision) throw fieldError('correctsReviewId', 'This review has no decision yet: change it instead of correcting it.');
      }
      const attendees = await resolveAttendees(deps, stage.programId, input.attendees, transaction);
      const { rollup, assets } = await stageFigures(deps, stage, asOf, transaction);
      const frozen: FrozenRollup = {
        asOf: asOf.toISOString(),
        stage: rollup,
        assets: [...assets]
          .sort((a, b) => a.readiness.score - b.readiness.score || byText(a.tag, b.tag))
          .map((a) => ({ id: a.id, tag: a.tag, score: a.readiness.score, result: a.readiness.result, cleared: a.readiness.cleared })),
      };
      const [row] = await deps.sequelize.query<{ id: string }>(
        `INSERT INTO gate_reviews (program_id, stage_id, opened_by, opened_at, frozen_rollup, attendees, notes, corrects_review_id)
         VALUES ($1, $2, $3, $4, $5::jsonb, $6::jsonb, $7, $8) RETURNING id`,
        {
          bind: [stage.programId, stage.id, user.id, asOf, JSON.stringify(frozen), JSON.stringify(attendees), input.notes, input.correctsReviewId ?? null],
          type: QueryTypes.SELECT,
          transaction,
        },
      );
      await recordHistory(
        {
          programId: stage.programId,
          entityType: 'gate-review',
          entityId: row.id,
          action: 'opened',
          actorId: user.id,
          after: {
            stageId: stage.id,
            stage: stage.name,
            meanScore: rollup.meanScore,
            counts: rollup.counts,
            attendees,
            notes: input.notes,
            correctsReviewId: input.correctsReviewId ?? null,
          },
        },
        transaction,
      );
      return (await reviewById(deps, row.id, transaction))!;
    });
  } catch (err) {
    if (err instanceof UniqueConstraintError) {
      const constraint = (err.parent as { constraint?: string } | undefined)?.constraint ?? '';
      if (constraint === 'gate_reviews_corrects') {
        throw new AppError(409, 'gate/already-corrected', 'This review has already been corrected: correct the correction instead.');
      }
      const [open] = await deps.sequelize.query<{ id: string }>(`SELECT id FROM gate_reviews WHERE stage_id = $1 AND decision IS NULL`, {
        bind: [stage.id],
        type: QueryTypes.SELECT,
      });
      throw new AppError(409, 'gate/review-open', 'A review of this stage is already open: record its decision first.', { reviewId: open?.id ?? null });
    }
    throw err;
  }
}

/** Attendees and notes of an open review; a decided one answers 409. */
export async function updateReview(deps: Deps, user: SessionUser, id: string, input: UpdateReview): Promise<GateReview> {
  return deps.sequelize.transaction(async (transaction) => {
    const row = await visibleReview(user, deps, id, transaction);
    if (row.decision) throw decided(await reviewById(deps, id, transaction));
    if (row.version !== input.version) throw conflict('Someone else changed this review first.', await reviewById(deps, id, transaction));
    const current = (await reviewById(deps, id, transaction))!;
    const attendees = input.attendees ? await resolveAttendees(deps, row.program_id, input.attendees, transaction) : current.attendees;
    const notes = input.notes ?? current.notes;
    await deps.sequelize.query(`UPDATE gate_reviews SET attendees = $2::jsonb, notes = $3, version = version + 1 WHERE id = $1`, {
      bind: [id, JSON.stringify(attendees), notes],
      transaction,
    });
    await recordHistory(
      {
        programId: row.program_id,
        entityType: 'gate-review',
        entityId: id,
        action: 'updated',
        actorId: user.id,
        before: { attendees: current.attendees, notes: current.notes },
        after: { attendees, notes },
      },
      transaction,
    );
    return (await reviewById(deps, id, transaction))!;
  });
}

// ---- The decision -------------------------------------------------------------------------

/** Records the decision once, with its actions, and e-mails it to every member of the program in the same transaction. */
export async function decideReview(deps: Deps, user: SessionUser, id: string, input: Decision, asOf = new Date()): Promise<GateReview> {
  return deps.sequelize.transaction(async (transaction) => {
    const row = await visibleReview(user, deps, id, transaction);
    if (row.decision) throw decided(await reviewById(deps, id, transaction));
    const ownerIds = [...new Set(input.actions.map((a) => a.ownerId.toLowerCase()))];
    const owners = ownerIds.length
      ? await deps.sequelize.query<{ id: string }>(
          `SELECT u.id FROM users u JOIN program_members pm ON pm.user_id = u.id AND pm.program_id = $1
            WHERE u.id = ANY($2::uuid[]) AND u.active AND u.role <> 'admin'`,
          { bind: [row.program_id, ownerIds], type: QueryTypes.SELECT, transaction },
        )
      : [];
    const known = new Set(owners.map((o) => o.id));
    input.actions.forEach((a, i) => {
      // Administrators own no actions (as they own no findings): they could not move them.
      if (!known.has(a.ownerId.toLowerCase())) throw fieldError(`actions.${i}.ownerId`, 'Choose someone who works in this program.');
      if (isPastDueDate(a.dueDate, asOf)) throw fieldError(`actions.${i}.dueDate`, 'Choose today or a later day.');
    });
    await deps.sequelize.query(
      `UPDATE gate_reviews SET decision = $2, decision_notes = $3, decided_by = $4, decided_at = $5, version = version + 1 WHERE id = $1`,
      { bind: [id, input.decision, input.notes, user.id, asOf], transaction },
    );
    if (input.actions.length) {
      const inserted = await deps.sequelize.query<{ id: string; title: string; owner_id: string; due_date: string }>(
        `INSERT INTO gate_actions (program_id, review_id, title, owner_id, due_date, position, updated_by)
         SELECT $1, $2, t.title, t.owner_id, t.due_date, t.position, $3
           FROM unnest($4::text[], $5::uuid[], $6::date[], $7::int[]) AS t(title, owner_id, due_date, position)
         RETURNING id, title, owner_id, due_date::text AS due_date`,
        {
          bind: [
            row.program_id,
            id,
            user.id,
            input.actions.map((a) => a.title),
            input.actions.map((a) => a.ownerId.toLowerCase()),
            input.actions.map((a) => a.dueDate),
            input.actions.map((_, i) => i),
          ],
          type: QueryTypes.SELECT,
          transaction,
        },
      );
      for (const a of inserted) {
        await recordHistory(
          {
            programId: row.program_id,
            entityType: 'gate-action',
            entityId: a.id,
            action: 'created',
            actorId: user.id,
            after: { reviewId: id, title: a.title, ownerId: a.owner_id, dueDate: a.due_date, status: 'open' },
          },
          transaction,
        );
      }
    }
    await recordHistory(
      {
        programId: row.program_id,
        entityType: 'gate-review',
        entityId: id,
        action: 'decided',
        actorId: user.id,
        before: { decision: null },
        after: { decision: input.decision, notes: input.notes, actions: input.actions.length },
      },
      transaction,
    );
    const review = (await reviewById(deps, id, transaction))!;
    await mailDecision(deps, review, user, transaction);
    return review;
  });
}

async function mailDecision(deps: Deps, review: GateReview, actor: SessionUser, transaction: Transaction) {
  const [program] = await deps.sequelize.query<{ code: string }>(`SELECT code FROM programs WHERE id = $1`, {
    bind: [review.programId],
    type: QueryTypes.SELECT,
    transaction,
  });
  const members = await deps.sequelize.query<{ name: string; email: string }>(
    `SELECT u.name, u.email FROM users u JOIN program_members pm ON pm.user_id = u.id AND pm.program_id = $1 WHERE u.active ORDER BY u.name, u.id`,
    { bind: [review.programId], type: QueryTypes.SELECT, transaction },
  );
  const decision = READINESS_RESULT_LABELS[review.decision!];
  const stage = review.frozen.stage;
  const lines = [
    `Gate review of ${review.stageName}: ${decision}.`,
    `Decided by ${actor.name} on ${review.decidedAt!.slice(0, 10)}.`,
    '',
    `When the review opened (${review.openedAt.slice(0, 16).replace('T', ' ')} UTC): ${stage.assetCount} assets, mean score ${stage.meanScore ?? 'none'}; ` +
      `${stage.counts.go} go, ${stage.counts.conditional} conditional, ${stage.counts.noGo} no-go.`,
    ...(stage.blockers.length ? ['What stood in the way:', ...stage.blockers.map((b) => `- ${b.text}`)] : []),
    ...(review.attendees.length ? ['', `Attendees: ${review.attendees.map((a) => a.name).join(', ')}`] : []),
    ...(review.decisionNotes ? ['', `Notes: ${review.decisionNotes}`] : []),
    ...(review.actions.length
      ? ['', 'Actions:', ...review.actions.map((a) => `- ${a.title} (owner: ${a.owner?.name ?? 'nobody'}, due ${a.dueDate}, ${GATE_ACTION_STATUS_LABELS[a.status].toLowerCase()})`)]
      : []),
    ...(review.correctsReviewId ? ['', `This decision corrects an earlier review: ${gateReviewUrl(deps, review.correctsReviewId)}`] : []),
    '',
    `Open the review: ${gateReviewUrl(deps, review.id)}`,
    '',
    'You get this e-mail because you are a member of this program: every gate decision goes to all of its members.',
  ];
  const subject = `[${program?.code ?? 'Proofyard'}] Gate decision for ${review.stageName}: ${decision}`.slice(0, 300);
  for (const m of members) {
    await enqueueMail({ to: m.email, kind: GATE_MAIL_KIND, subject, text: [`Hello ${m.name},`, '', ...lines].join('\n') }, transaction);
  }
}

// ---- Actions ------------------------------------------------------------------------------

/** The action when the user belongs to its program; otherwise 404. */
export async function visibleAction(deps: Deps, user: SessionUser, id: string, transaction?: Transaction): Promise<ActionRow> {
  const [row] = await deps.sequelize.query<ActionRow>(`${ACTION_SELECT} WHERE a.id = $1 ${transaction ? 'FOR UPDATE OF a' : ''}`, {
    bind: [id],
    type: QueryTypes.SELECT,
    transaction,
  });
  if (!row || !user.programIds.includes(row.program_id)) throw notFound('This gate action');
  return row;
}

/**
 * Moves an action (its owner or a lead), with an optional note kept on the action and in its
 * history. The same status with a different note changes only the note. Only gate_actions is
 * written: the decided review beside it stays as it was (its trigger never fires).
 */
export async function updateAction(deps: Deps, user: SessionUser, id: string, input: UpdateAction): Promise<GateAction> {
  return deps.sequelize.transaction(async (transaction) => {
    const row = await visibleAction(deps, user, id, transaction);
    if (row.owner_id !== user.id && !ACTION_MANAGERS.includes(user.role)) {
      throw new AppError(403, 'gate/action-forbidden', "Only the action's owner or a lead can change it.");
    }
    if (row.version !== input.version) throw conflict('Someone else changed this action first.', actionDto(row));
    const statusChanged = row.status !== input.status;
    // A status change without a note clears the last one (it spoke of the earlier status).
    const note = input.note ?? (statusChanged ? '' : row.note);
    if (!statusChanged && note === row.note) return actionDto(row);
    await deps.sequelize.query(
      `UPDATE gate_actions SET status = $2, note = $3, updated_by = $4, version = version + 1, updated_at = now() WHERE id = $1`,
      { bind: [id, input.status, note, user.id], transaction },
    );
    await recordHistory(
      {
        programId: row.program_id,
        entityType: 'gate-action',
        entityId: id,
        action: statusChanged ? 'status-changed' : 'note-changed',
        actorId: user.id,
        before: { status: row.status, note: row.note },
        after: { status: input.status, note },
      },
      transaction,
    );
    const [updated] = await deps.sequelize.query<ActionRow>(`${ACTION_SELECT} WHERE a.id = $1`, { bind: [id], type: QueryTypes.SELECT, transaction });
    return actionDto(updated);
  });
}

export async function listActions(deps: Deps, user: SessionUser, q: ActionListQuery): Promise<{ items: GateAction[] }> {
  assertMember(user, q.programId, 'This program');
  const rows = await deps.sequelize.query<ActionRow>(
    `${ACTION_SELECT} WHERE a.program_id = $1 AND ($2::uuid IS NULL OR a.owner_id = $2::uuid) AND ($3::text IS NULL OR a.status = $3)
      ORDER BY a.status = 'done', CASE WHEN a.status = 'done' THEN NULL ELSE a.due_date END, a.updated_at DESC, a.id`,
    { bind: [q.programId, q.mine === 'true' ? user.id : null, q.status ?? null], type: QueryTypes.SELECT },
  );
  return { items: rows.map((r) => actionDto(r)) };
}
