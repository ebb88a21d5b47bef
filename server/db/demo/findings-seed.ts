// Demo findings of the fictional FW3 program (PRODUCT.md section 8): a few hundred problems
// found while building and testing its assets, with owners, watchers, comments, due dates (some
// overdue) and the history of how each one moved. Everything here is invented. Rows go in with
// one INSERT per table; a seeded random generator keeps the demo the same on every machine.
import crypto from 'node:crypto';
import { QueryTypes, type Transaction } from 'sequelize';
import type { AssetKind, System } from '../../../shared/schemas/assets';
import type { FindingSeverity, FindingStatus } from '../../../shared/schemas/findings';
import type { Program, User } from '../models';

/** mulberry32: a small seeded generator (common practice, no source needed for a demo). */
function rng(seed: number) {
  let a = seed >>> 0;
  const next = () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  const int = (min: number, max: number) => min + Math.floor(next() * (max - min + 1));
  const pick = <T,>(list: readonly T[]): T => list[Math.floor(next() * list.length)];
  const weighted = <T,>(pairs: ReadonlyArray<readonly [T, number]>): T => {
    let roll = next() * pairs.reduce((n, [, w]) => n + w, 0);
    for (const [value, w] of pairs) {
      roll -= w;
      if (roll < 0) return value;
    }
    return pairs[pairs.length - 1][0];
  };
  return { next, int, pick, weighted };
}

type Problem = { system: System; title: string; description: string; severities: FindingSeverity[]; kinds: AssetKind[] };

const V: AssetKind[] = ['vehicle'];
const VB: AssetKind[] = ['vehicle', 'bench-rig'];
const ALL: AssetKind[] = ['vehicle', 'bench-rig', 'component'];

// {side}, {corner} and {conn} are filled in per finding, so the titles vary across assets.
const PROBLEMS: Problem[] = [
  { system: 'thermal', title: 'Coolant weep at rear chiller union', description: 'Damp ring at the chiller union after the overnight soak; no drip yet.', severities: ['major', 'minor'], kinds: VB },
  { system: 'thermal', title: 'Coolant hose rubbing on {side} motor mount', description: 'Witness marks on the hose where it touches the mount bracket under load.', severities: ['major'], kinds: V },
  { system: 'thermal', title: 'Battery coolant loop loses pressure', description: 'Loop drops about 0.1 bar over ten minutes in the pressure test.', severities: ['blocking', 'major'], kinds: VB },
  { system: 'thermal', title: 'Electric coolant pump noisy at low speed', description: 'Whine audible in the cabin below 30 % pump duty.', severities: ['minor'], kinds: V },
  { system: 'thermal', title: 'Cabin heater slow to warm up', description: 'Outlet temperature takes over five minutes to rise at 0 °C ambient.', severities: ['minor', 'major'], kinds: V },
  { system: 'thermal', title: 'Refrigerant charge label missing', description: 'No charge label on the front end carrier; amount not recorded on the build sheet.', severities: ['minor'], kinds: V },
  { system: 'thermal', title: 'Radiator fan stalls at full duty', description: 'Fan stops at about 70 % when commanded to 100 % from the tester.', severities: ['major'], kinds: V },
  { system: 'high-voltage', title: 'HV interlock loop open after pack refit', description: 'BMS reports HVIL open after the pack went back in; the loop checks good on the bench.', severities: ['safety', 'blocking'], kinds: VB },
  { system: 'high-voltage', title: 'Isolation resistance below limit on HV-', description: 'Insulation tester reads under the site limit on HV- to chassis; pack and inverter disconnected one at a time.', severities: ['safety'], kinds: VB },
  { system: 'high-voltage', title: 'HV cable chafing at {side} subframe bracket', description: 'Orange sleeve worn through at the bracket edge; conductor insulation intact.', severities: ['safety', 'blocking'], kinds: V },
  { system: 'high-voltage', title: 'Service disconnect hard to reach', description: 'Rear seat must come out to reach the service disconnect on this build.', severities: ['minor', 'major'], kinds: V },
  { system: 'high-voltage', title: 'Pre-charge time longer than specified', description: 'Pre-charge takes about twice the specified time in the BMS log.', severities: ['major', 'blocking'], kinds: VB },
  { system: 'high-voltage', title: 'Inverter phase cable torque mark broken', description: 'Torque stripe on phase W is broken; bolt may have been disturbed.', severities: ['major'], kinds: VB },
  { system: 'high-voltage', title: 'On-board charger stops at 80 %', description: 'AC charging stops at 80 % state of charge with a communication timeout.', severities: ['major', 'blocking'], kinds: V },
  { system: 'high-voltage', title: 'HV connector secondary lock not engaged at {conn}', description: 'Secondary lock sits proud; connector could back out under vibration.', severities: ['blocking', 'major'], kinds: ALL },
  { system: 'low-voltage-harness', title: 'CAN bus termination measures 120 ohm', description: 'Only one terminating resistor found on the chassis CAN; expected about 60 ohm.', severities: ['blocking', 'major'], kinds: VB },
  { system: 'low-voltage-harness', title: 'Connector {conn} CPA will not close', description: 'Connector position assurance does not latch; housing looks deformed.', severities: ['major', 'minor'], kinds: ALL },
  { system: 'low-voltage-harness', title: 'Ground strap missing at {side} subframe', description: 'Ground strap not fitted; drawing shows one at the subframe mount.', severities: ['major'], kinds: V },
  { system: 'low-voltage-harness', title: 'Harness clip broken behind dashboard', description: 'Harness hangs onto the pedal box bracket; clip base snapped.', severities: ['minor', 'major'], kinds: V },
  { system: 'low-voltage-harness', title: '12 V battery drains overnight', description: 'Quiescent current about 180 mA after sleep; one ECU keeps the bus awake.', severities: ['major', 'blocking'], kinds: V },
  { system: 'low-voltage-harness', title: 'Fuse F{n} rating differs from fuse map', description: 'Fitted fuse is 15 A, the fuse map says 10 A.', severities: ['minor', 'major'], kinds: VB },
  { system: 'low-voltage-harness', title: 'Diagnostic port pin 6 not populated', description: 'No CAN-H at the diagnostic port; the tester connects only through the breakout.', severities: ['minor'], kinds: V },
  { system: 'software', title: 'Front zone controller one release behind baseline', description: 'Read-out shows the previous release; flash aborted at 80 %.', severities: ['blocking', 'major'], kinds: VB },
  { system: 'software', title: 'Body controller logs U-code after wake-up', description: 'Lost communication code stored on every wake-up; clears itself after ten seconds.', severities: ['minor', 'major'], kinds: VB },
  { system: 'software', title: 'Calibration dataset ID does not match build sheet', description: 'Dataset in the read-out is from the previous build phase.', severities: ['major'], kinds: VB },
  { system: 'software', title: 'Cockpit compute reboots when reversing', description: 'Centre screen goes black and restarts when reverse is selected with the camera on.', severities: ['major', 'blocking'], kinds: V },
  { system: 'software', title: 'VIN not written to brake ECU', description: 'Brake ECU returns an empty VIN; all other ECUs return the right one.', severities: ['major'], kinds: V },
  { system: 'software', title: 'Data logger drops frames above 60 % bus load', description: 'Gaps of up to 200 ms in the log at high bus load.', severities: ['minor', 'major'], kinds: VB },
  { system: 'software', title: 'Restbus file out of date on bench', description: 'Restbus still simulates the old gateway; two ECUs report missing signals.', severities: ['minor'], kinds: ['bench-rig'] },
  { system: 'chassis', title: 'Long brake pedal travel after bleed', description: 'Pedal travel beyond the marked band after two bleeds; air suspected at the {corner} caliper.', severities: ['safety', 'blocking'], kinds: V },
  { system: 'chassis', title: 'Steering column pinch bolt torque mark missing', description: 'No torque stripe on the pinch bolt; torque not recorded.', severities: ['blocking', 'major'], kinds: V },
  { system: 'chassis', title: 'Wheel nut torque not recorded at {corner}', description: 'Build sheet has no torque entry for this wheel.', severities: ['major'], kinds: V },
  { system: 'chassis', title: 'Parking brake does not hold on test ramp', description: 'Vehicle creeps on the ramp with the parking brake applied.', severities: ['safety', 'blocking'], kinds: V },
  { system: 'chassis', title: 'Knock from {corner} suspension over bumps', description: 'Single knock over the speed bumps on the test loop; strut top mount suspected.', severities: ['major', 'minor'], kinds: V },
  { system: 'chassis', title: 'Toe out of tolerance at rear axle', description: 'Alignment print-out shows rear toe outside the band.', severities: ['major'], kinds: V },
  { system: 'chassis', title: 'Tyre pressure sensor not learned at {corner}', description: 'Cluster shows dashes for this wheel after the learn routine.', severities: ['minor'], kinds: V },
  { system: 'chassis', title: 'Subframe bolt thread damaged', description: 'Rear subframe bolt would not reach torque; thread in the body nut looks stripped.', severities: ['blocking', 'major'], kinds: V },
  { system: 'body', title: 'Door seal pinch at B-pillar', description: 'Seal folds over at the {side} B-pillar when the door closes; wind noise on the loop.', severities: ['minor', 'major'], kinds: V },
  { system: 'body', title: 'Tailgate latch needs two tries', description: 'Tailgate bounces back on the first close at normal force.', severities: ['minor'], kinds: V },
  { system: 'body', title: 'Water ingress at windscreen lower corner', description: 'Water on the {side} A-pillar trim after the rain booth.', severities: ['major'], kinds: V },
  { system: 'body', title: '{side} indicator flashes fast', description: 'Bulb-out detection trips with the prototype lamp.', severities: ['minor'], kinds: V },
  { system: 'body', title: 'Seat rail bolt torque mark missing', description: 'Rear inner bolt of the driver seat has no torque mark.', severities: ['minor', 'major'], kinds: V },
  { system: 'body', title: 'Underbody panel fastener missing', description: 'Two fasteners missing at the front of the underbody panel; panel flutters at speed.', severities: ['minor'], kinds: V },
  { system: 'body', title: 'Bonnet gap uneven at {side} headlamp', description: 'Gap tapers from 6 mm to 2 mm along the headlamp.', severities: ['minor'], kinds: V },
  { system: 'body', title: 'Rig enclosure cover cracked', description: 'Polycarbonate cover cracked at the hinge; still closes.', severities: ['minor'], kinds: ['bench-rig'] },
  { system: 'safety', title: 'Emergency stop does not open contactors', description: 'Contactors stay closed for about three seconds after the emergency stop is pressed.', severities: ['safety'], kinds: ['bench-rig'] },
  { system: 'safety', title: 'Prototype warning label missing on tailgate', description: 'Label not fitted after the tailgate was replaced.', severities: ['minor', 'major'], kinds: V },
  { system: 'safety', title: 'Fire extinguisher out of date', description: 'Inspection tag expired last month.', severities: ['major', 'minor'], kinds: VB },
  { system: 'safety', title: 'Driver seat belt pretensioner connector loose', description: 'Pretensioner connector not locked; airbag lamp on.', severities: ['safety', 'blocking'], kinds: V },
  { system: 'safety', title: 'Load machine coupling guard interlock bypassed', description: 'Guard interlock bridged with a jumper; found during the shift handover.', severities: ['safety'], kinds: ['bench-rig'] },
  { system: 'thermal', title: 'Pack cold plate outlet temperature sensor reads high', description: 'Sensor reads about 8 °C above the inlet at idle; other sensors agree with each other.', severities: ['minor', 'major'], kinds: ['component', 'bench-rig'] },
  { system: 'low-voltage-harness', title: 'Component harness label illegible', description: 'Printed label smeared; part number cannot be read.', severities: ['minor'], kinds: ['component'] },
];

const SIDES = ['Left', 'Right'];
const CORNERS = ['front left', 'front right', 'rear left', 'rear right'];
const CONNECTORS = ['X1', 'X2', 'X4', 'X7', 'X12', 'X15', 'X21'];

const COMMENTS = [
  'Parts ordered, due on Thursday.',
  'Seen again on the morning check; photo on the asset.',
  'Checked on the hoist: clamp re-seated and torque-marked.',
  'Needs the updated harness drawing before we can fix it.',
  'Supplier engineer on site Monday; will look at it with them.',
  'Could not reproduce at 20 °C. Will try again in the climate lab.',
  'Fix applied on the night shift; please verify.',
  'Added to the list for the gate review.',
  'Same issue on two other cars of this build; probably a batch problem.',
  'Workaround in place for the test this week; proper fix next build.',
  'Measured again after the change: within the limit now.',
  'Moved to the parts cage until the replacement arrives.',
  'Software team has a candidate release; flashing tomorrow.',
  'Torque tool was out of calibration; re-torqued with the spare.',
  'Not urgent for the current tests, but needed before validation.',
];
const REJECT_REASONS = [
  'Duplicate of an earlier finding on this asset.',
  'Within tolerance after re-measurement with a calibrated tool.',
  'Expected behaviour of this software release; see the release notes.',
  'Caused by the test fixture, not the vehicle.',
];
const REOPEN_REASONS = ['Came back after the overnight soak.', 'Fault returned on the next drive.', 'Fix did not hold after the rough-road loop.'];

type AssetRow = { id: string; tag: string; kind: AssetKind };
type HistoryRow = {
  program_id: string;
  entity_type: 'finding';
  entity_id: string;
  action: string;
  actor_id: string | null;
  at: string;
  before: object | null;
  after: object | null;
  note: string | null;
};

const DAY = 24 * 3600 * 1000;
/** About this many findings; the spread below is the demo's own choice. */
export const DEMO_FINDINGS = 320;

export async function seedFindings(ctx: { transaction: Transaction; now: number }, program: Program, people: User[]) {
  const { transaction, now } = ctx;
  const sequelize = program.sequelize;
  const r = rng(0xf1d1e);
  const assets = await sequelize.query<AssetRow>(`SELECT id, tag, kind FROM assets WHERE program_id = $1 ORDER BY tag`, {
    bind: [program.id],
    type: QueryTypes.SELECT,
    transaction,
  });
  if (!assets.length) return { findings: 0 };
  const by = (role: string) => people.filter((p) => p.role === role);
  const engineers = by('engineer');
  const technicians = by('technician');
  const leads = by('lead');
  const verifiers = [...engineers, ...leads];
  const workers = people.filter((p) => p.role !== 'admin');
  const iso = (ms: number) => new Date(ms).toISOString();
  const day = (ms: number) => new Date(ms).toISOString().slice(0, 10);

  const findings: object[] = [];
  const watchers: object[] = [];
  const comments: object[] = [];
  const history: HistoryRow[] = [];
  let openSafety = 0;

  for (let i = 0; i < DEMO_FINDINGS; i += 1) {
    // Vehicles carry most findings; a component now and then.
    const asset = r.weighted(assets.map((a) => [a, a.kind === 'vehicle' ? 6 : a.kind === 'bench-rig' ? 3 : 1] as const));
    const problem = r.pick(PROBLEMS.filter((p) => p.kinds.includes(asset.kind)));
    let severity = r.pick(problem.severities);
    // Few safety findings: most problems that could be safety ones are filed one step lower.
    if (severity === 'safety' && problem.severities.length > 1 && r.next() < 0.6) severity = problem.severities[1];
    const fill = (s: string) =>
      s.replace('{side}', r.pick(SIDES)).replace('{corner}', r.pick(CORNERS)).replace('{conn}', r.pick(CONNECTORS)).replace('{n}', String(r.int(10, 48)));
    const title = fill(problem.title);
    const description = fill(problem.description);
    const id = crypto.randomUUID();
    // Created over the last six weeks, more of them recently.
    const ageDays = 42 * r.next() ** 1.4;
    const createdAt = now - ageDays * DAY - r.int(0, 8 * 3600) * 1000;
    const creator = r.pick(r.next() < 0.75 ? technicians : workers);
    const owner = r.next() < 0.08 ? null : r.weighted([[r.pick(engineers), 6], [r.pick(technicians), 3], [r.pick(leads), 1]] as const);
    const dueMs = createdAt + (severity === 'safety' ? r.int(1, 3) : severity === 'blocking' ? r.int(3, 10) : r.int(10, 35)) * DAY;
    const dueDate = r.next() < 0.12 ? null : day(dueMs);

    // Older findings have moved further along; safety findings are dealt with quickly.
    const progress = Math.min(1, ageDays / 21) * 0.85 + r.next() * 0.35;
    let path: Array<{ to: FindingStatus; reason?: string }>;
    if (r.next() < 0.07) path = [{ to: 'rejected', reason: r.pick(REJECT_REASONS) }];
    else if (severity === 'safety') path = openSafety < 1 && ageDays < 5 ? [{ to: 'in-work' }] : [{ to: 'in-work' }, { to: 'fixed' }, { to: 'verified' }];
    else if (progress > 0.85) path = [{ to: 'in-work' }, { to: 'fixed' }, { to: 'verified' }];
    else if (progress > 0.7) path = [{ to: 'in-work' }, { to: 'fixed' }];
    else if (progress > 0.45) path = [{ to: 'in-work' }];
    else path = [];
    // Now and then a fix does not hold: reopened, then worked again.
    if (path.length === 3 && r.next() < 0.08) {
      path = [{ to: 'in-work' }, { to: 'fixed' }, { to: 'open', reason: r.pick(REOPEN_REASONS) }, { to: 'in-work' }];
    }
    if (severity === 'safety' && path[path.length - 1]?.to === 'in-work') openSafety += 1;

    const creatorSnapshot = { id: creator.id, name: creator.name };
    const ownerSnapshot = owner ? { id: owner.id, name: owner.name } : null;
    const watcherPeople = [...new Set(Array.from({ length: r.weighted([[0, 4], [1, 4], [2, 2], [3, 1]] as const) }, () => r.pick(workers)))].filter(
      (w) => w.id !== owner?.id,
    );
    history.push({
      program_id: program.id,
      entity_type: 'finding',
      entity_id: id,
      action: 'created',
      actor_id: creator.id,
      at: iso(createdAt),
      before: null,
      after: {
        title,
        description,
        system: problem.system,
        severity,
        status: 'open',
        rejectReason: null,
        owner: ownerSnapshot,
        watchers: watcherPeople.map((w) => ({ id: w.id, name: w.name })),
        dueDate,
        assetId: asset.id,
        assetTag: asset.tag,
        checklistItemId: null,
      },
      note: null,
    });
    for (const w of watcherPeople) watchers.push({ finding_id: id, user_id: w.id, created_at: iso(createdAt) });

    // Events spread between creation and now; comments fall between them.
    const span = Math.max(3600_000, now - createdAt - 3600_000);
    const times = path.map(() => createdAt + r.next() * span).sort((a, b) => a - b);
    let status: FindingStatus = 'open';
    let rejectReason: string | null = null;
    let version = 0;
    let updatedAt = createdAt;
    path.forEach((step, k) => {
      const actor =
        step.to === 'verified' || step.to === 'rejected'
          ? r.pick(verifiers)
          : step.to === 'open'
            ? r.pick(workers)
            : (owner ?? r.pick(engineers));
      history.push({
        program_id: program.id,
        entity_type: 'finding',
        entity_id: id,
        action: 'status-changed',
        actor_id: actor.id,
        at: iso(times[k]),
        before: { status, ...(rejectReason ? { rejectReason } : {}) },
        after: { status: step.to, ...(step.to === 'rejected' ? { rejectReason: step.reason } : {}) },
        note: step.reason ?? null,
      });
      status = step.to;
      rejectReason = step.to === 'rejected' ? (step.reason ?? null) : null;
      version += 1;
      updatedAt = times[k];
    });
    const nComments = r.weighted([[0, 3], [1, 3], [2, 2], [3, 1], [4, 1]] as const);
    for (let c = 0; c < nComments; c += 1) {
      const at = createdAt + r.next() * span;
      const author = r.pick([...(owner ? [owner, owner] : []), creator, ...watcherPeople, r.pick(engineers)]);
      const commentId = crypto.randomUUID();
      const body = r.pick(COMMENTS);
      comments.push({ id: commentId, program_id: program.id, finding_id: id, author_id: author.id, body, created_at: iso(at) });
      history.push({
        program_id: program.id,
        entity_type: 'finding',
        entity_id: id,
        action: 'commented',
        actor_id: author.id,
        at: iso(at),
        before: null,
        after: { commentId, body },
        note: null,
      });
    }
    findings.push({
      id,
      program_id: program.id,
      asset_id: asset.id,
      checklist_item_id: null,
      title,
      description,
      system: problem.system,
      severity,
      status,
      reject_reason: rejectReason,
      owner_id: owner?.id ?? null,
      due_date: dueDate,
      created_by: creatorSnapshot.id,
      version,
      created_at: iso(createdAt),
      updated_at: iso(updatedAt),
    });
  }

  const insert = (table: string, columns: string[], rows: object[]) =>
    rows.length
      ? sequelize.query(
          `INSERT INTO ${table} (${columns.join(', ')}) SELECT ${columns.join(', ')} FROM json_populate_recordset(null::${table}, $1::json)`,
          { bind: [JSON.stringify(rows)], transaction },
        )
      : Promise.resolve();
  await insert(
    'findings',
    ['id', 'program_id', 'asset_id', 'checklist_item_id', 'title', 'description', 'system', 'severity', 'status', 'reject_reason', 'owner_id', 'due_date', 'created_by', 'version', 'created_at', 'updated_at'],
    findings,
  );
  await insert('finding_watchers', ['finding_id', 'user_id', 'created_at'], watchers);
  await insert('finding_comments', ['id', 'program_id', 'finding_id', 'author_id', 'body', 'created_at'], comments);
  await insert('history_entries', ['program_id', 'entity_type', 'entity_id', 'action', 'actor_id', 'at', 'before', 'after', 'note'], history);
  return { findings: findings.length, comments: comments.length, history: history.length };
}
