import {
  allowedTransitions,
  checkDetailEdit,
  checkTransition,
  isOverdue,
  isPastDueDate,
  type FindingActor,
  type FindingState,
} from '../../shared/domain/finding-workflow';
import type { Role } from '../../shared/schemas/auth';
import type { FindingStatus } from '../../shared/schemas/findings';

const OWNER = 'owner-id';
const at = (status: FindingStatus, severity: FindingState['severity'] = 'major'): FindingState => ({ status, severity, ownerId: OWNER, createdBy: 'creator-id' });
const actor = (role: Role, id = 'someone'): FindingActor => ({ id, role });

// The product's own rules: PRODUCT.md section 3C and issue 4 (no outside source).
describe('transitions', () => {
  it.each([
    ['open', 'in-work', actor('technician', OWNER), true],
    ['open', 'in-work', actor('technician'), false],
    ['in-work', 'fixed', actor('driver', OWNER), true],
    ['in-work', 'fixed', actor('engineer'), true],
    ['fixed', 'verified', actor('lead'), true],
    ['fixed', 'verified', actor('technician', OWNER), false],
    ['open', 'rejected', actor('engineer'), true],
    ['open', 'rejected', actor('coordinator', OWNER), false],
    ['verified', 'open', actor('driver'), true],
    ['rejected', 'open', actor('technician'), true],
  ] as const)('when a finding is %s and goes to %s by %o, then allowed is %s', (from, to, who, ok) => {
    expect(checkTransition(at(from), to, who).ok).toBe(ok);
  });

  it.each([
    ['open', 'verified'],
    ['in-work', 'verified'],
    ['verified', 'fixed'],
    ['rejected', 'in-work'],
    ['verified', 'rejected'],
  ] as const)('when a finding is %s, then it cannot go to %s for anyone (400 naming status)', (from, to) => {
    expect(checkTransition(at(from), to, actor('lead'))).toMatchObject({ ok: false, status: 400, field: 'status' });
  });

  it.each([
    ['open', 'rejected', true],
    ['fixed', 'open', true],
    ['verified', 'open', true],
    ['in-work', 'open', false],
    ['fixed', 'verified', false],
  ] as const)('when a finding goes from %s to %s, then a reason is required: %s', (from, to, required) => {
    expect(checkTransition(at(from), to, actor('engineer'))).toEqual({ ok: true, reasonRequired: required });
  });

  it('when the buttons are computed, then each role sees only the moves it may make', () => {
    expect(allowedTransitions(at('fixed'), actor('technician', OWNER))).toEqual(['in-work', 'open']);
    expect(allowedTransitions(at('fixed'), actor('engineer'))).toEqual(['in-work', 'verified', 'rejected', 'open']);
    expect(allowedTransitions(at('open'), actor('driver'))).toEqual([]);
  });

  it('when a finding has no owner, then nobody counts as its owner', () => {
    expect(checkTransition({ ...at('open'), ownerId: null }, 'in-work', { id: '', role: 'technician' }).ok).toBe(false);
  });
});

describe('detail edits', () => {
  const none = { fields: [], watchersAdded: [], watchersRemoved: [] };
  it('when a technician lowers a safety finding, then 403; an engineer may', () => {
    expect(checkDetailEdit(at('open', 'safety'), { ...none, fields: ['severity'], severity: 'minor' }, actor('technician', OWNER))).toMatchObject({ ok: false, status: 403 });
    expect(checkDetailEdit(at('open', 'safety'), { ...none, fields: ['severity'], severity: 'minor' }, actor('engineer')).ok).toBe(true);
  });
  it('when a member who is not creator or owner watches or unwatches, then only themselves', () => {
    expect(checkDetailEdit(at('open'), { ...none, watchersAdded: ['me'] }, actor('driver', 'me')).ok).toBe(true);
    expect(checkDetailEdit(at('open'), { ...none, watchersRemoved: ['you'] }, actor('driver', 'me')).ok).toBe(false);
    expect(checkDetailEdit(at('open'), { ...none, fields: ['title'] }, actor('driver', 'me')).ok).toBe(false);
    expect(checkDetailEdit(at('open'), { ...none, fields: ['title'] }, actor('driver', 'creator-id')).ok).toBe(true);
  });
});

describe('dates', () => {
  // UTC-12 is the westernmost offset in use (the IANA tz database's Etc/GMT+12, from memory):
  // a date is "in the past" only once it is yesterday there.
  it.each([
    ['2026-12-02T05:00:00Z', '2026-12-01', false],
    ['2026-12-02T05:00:00Z', '2026-11-30', true],
    ['2026-12-02T13:00:00Z', '2026-12-01', true],
    ['2026-12-02T13:00:00Z', '2026-12-02', false],
  ])('when it is %s, then %s is in the past: %s', (now, date, past) => {
    expect(isPastDueDate(date, new Date(now))).toBe(past);
  });

  it.each([
    ['2026-12-01', 'open', true],
    ['2026-12-01', 'fixed', true],
    ['2026-12-01', 'verified', false],
    ['2026-12-01', 'rejected', false],
    ['2026-12-02', 'open', false],
    [null, 'open', false],
  ] as const)('when due %s and %s on 2026-12-02 (UTC), then overdue is %s', (dueDate, status, overdue) => {
    expect(isOverdue({ dueDate, status }, new Date('2026-12-02T10:00:00Z'))).toBe(overdue);
  });
});
