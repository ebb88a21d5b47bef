import path from 'node:path';
import Papa from 'papaparse';
import { QueryTypes, type Transaction } from 'sequelize';
import type { AssetKind } from '../../shared/schemas/assets';
import {
  IMPORT_COLUMNS,
  IMPORT_FILE_FIELD,
  IMPORT_MAX_BYTES,
  IMPORT_MAX_ROWS,
  SoftwareVersionSchema,
  type ImportColumn,
  type ImportOutcome,
  type ImportPreview,
  type ImportResult,
  type ImportRow,
} from '../../shared/schemas/software';
import type { Deps } from '../deps';
import { AppError } from '../lib/app-error';
import type { SessionUser } from '../middleware/auth';
import { evaluateAsset, loadEcus, loadReleasedBaselines } from './software-common';
import { loadInstalled, readValues, writeFlashes, type FlashWrite, type ReadValues } from './software-installed';
import { assertMember } from './stages';

// Import of an ECU identification read-out (issue 5): rows of asset tag or VIN, ECU code and the
// values read with the UDS identification data identifiers (ISO 14229-1, service 0x22: F188
// software number, F189 software version, F18C serial, F190 VIN, F191 hardware number). The
// preview writes nothing; applying re-checks every row inside one transaction and writes all of
// them or none.

export type ReadoutFile = { buffer: Buffer; originalname: string; mimetype: string };

type RawRow = { row: number; values: Partial<Record<ImportColumn, string>>; problems: string[] };
type Parsed = { rows: RawRow[]; columns: Record<string, string> };

const importError = (code: string, message: string, details?: object) =>
  new AppError(400, code, message, { fields: { [IMPORT_FILE_FIELD]: message }, ...details });

const COLUMN_LABELS: Record<ImportColumn, string> = {
  tag: 'the asset tag',
  vin: 'the VIN (F190)',
  ecu: 'the ECU code',
  softwareNumber: 'the software number (F188)',
  softwareVersion: 'the software version (F189)',
  ecuSerial: 'the ECU serial number (F18C)',
  hardwareNumber: 'the hardware number (F191)',
  flashedAt: 'the time of the read-out',
};

/** Header names compared without case, spaces, dashes, underscores, dots or a `0x` / `DID` prefix. */
const norm = (name: string) => name.toLowerCase().replace(/[\s_\-.]/g, '').replace(/^(0x|did)/, '');
const IS_DID = /^f1[0-9a-f]{2}$/;

/** A header that starts with a data identifier ("F189", "0xF189 Software version", "DID F18C serial"). */
const LEADING_DID = /^\s*(?:0x|did[\s_-]*)?(f1[0-9a-f]{2})(?![0-9a-f])/i;

/** Which value each header gives: a known name, or a header that starts with the value's identifier. */
function columnFor(header: string): ImportColumn | null {
  const key = norm(header);
  const did = LEADING_DID.exec(header)?.[1].toLowerCase();
  for (const [column, aliases] of Object.entries(IMPORT_COLUMNS) as Array<[ImportColumn, readonly string[]]>) {
    for (const alias of aliases.map(norm)) {
      if (key === alias || (IS_DID.test(alias) && did === alias)) return column;
    }
  }
  return null;
}

function mapColumns(headers: string[]): Map<string, ImportColumn> {
  const map = new Map<string, ImportColumn>();
  const byColumn = new Map<ImportColumn, string>();
  for (const header of headers) {
    const column = columnFor(header);
    if (!column) continue;
    const other = byColumn.get(column);
    if (other !== undefined) {
      throw importError('import/duplicate-columns', `Two columns give ${COLUMN_LABELS[column]}: "${other}" and "${header}". Keep one and send the file again.`);
    }
    byColumn.set(column, header);
    map.set(header, column);
  }
  const missing: string[] = [];
  if (!byColumn.has('tag') && !byColumn.has('vin')) missing.push('the asset tag or the VIN (F190)');
  if (!byColumn.has('ecu')) missing.push(COLUMN_LABELS.ecu);
  if (!byColumn.has('softwareVersion')) missing.push(COLUMN_LABELS.softwareVersion);
  if (missing.length) {
    throw importError(
      'import/missing-columns',
      `The read-out has no column for ${missing.join(', ')}. Name the columns for example asset_tag, ecu, F189 (software version), F188, F18C, F191, F190.`,
      { missing, found: headers.slice(0, 50) },
    );
  }
  return map;
}

function toRaw(records: Array<{ row: number; record: Record<string, unknown>; problems: string[] }>, columns: Map<string, ImportColumn>): RawRow[] {
  return records.map(({ row, record, problems }) => {
    const values: RawRow['values'] = {};
    for (const [header, column] of columns) {
      const value = record[header];
      if (value === undefined || value === null) continue;
      if (typeof value === 'string' || typeof value === 'number') values[column] = String(value).trim();
      else problems.push(`The column "${header}" holds a ${Array.isArray(value) ? 'list' : typeof value}, not a value.`);
    }
    return { row, values, problems };
  });
}

const describe = (columns: Map<string, ImportColumn>) => Object.fromEntries([...columns].map(([header, column]) => [column, header]));

/** Rows of a JSON read-out: a list of rows, `{ rows: [...] }`, or objects per asset with an `ecus` list. */
export function parseJsonRows(value: unknown): Parsed {
  let items: unknown[];
  if (Array.isArray(value)) items = value;
  else if (value && typeof value === 'object') {
    const obj = value as Record<string, unknown>;
    const list = ['rows', 'assets', 'vehicles'].map((k) => obj[k]).find(Array.isArray);
    items = list ?? (Object.keys(obj).some((k) => norm(k) === 'ecus') ? [obj] : []);
    if (!list && !items.length) throw importError('import/malformed', 'The JSON read-out must be a list of rows, or an object with a "rows" list.');
  } else {
    throw importError('import/malformed', 'The JSON read-out must be a list of rows, or an object with a "rows" list.');
  }
  const records: Array<{ row: number; record: Record<string, unknown>; problems: string[] }> = [];
  const push = (record: Record<string, unknown>, problems: string[] = []) => {
    if (records.length >= IMPORT_MAX_ROWS) throw importError('import/too-many-rows', `The read-out has more than ${IMPORT_MAX_ROWS} rows. Split it and import each part.`);
    records.push({ row: records.length + 1, record, problems });
  };
  for (const item of items) {
    if (!item || typeof item !== 'object' || Array.isArray(item)) {
      push({}, ['This row is not an object of named values.']);
      continue;
    }
    const obj = item as Record<string, unknown>;
    const ecusKey = Object.keys(obj).find((k) => norm(k) === 'ecus' && Array.isArray(obj[k]));
    if (!ecusKey) {
      push(obj);
      continue;
    }
    const parent = Object.fromEntries(Object.entries(obj).filter(([k]) => k !== ecusKey));
    for (const child of obj[ecusKey] as unknown[]) {
      if (!child || typeof child !== 'object' || Array.isArray(child)) push(parent, ['An entry of "ecus" is not an object of named values.']);
      else push({ ...parent, ...(child as Record<string, unknown>) });
    }
  }
  if (!records.length) throw importError('import/empty', 'The read-out has no rows.');
  const headers = [...new Set(records.flatMap((r) => Object.keys(r.record)))];
  const columns = mapColumns(headers);
  return { rows: toRaw(records, columns), columns: describe(columns) };
}

function parseCsvRows(text: string): Parsed {
  const result = Papa.parse<Record<string, unknown>>(text, { header: true, skipEmptyLines: 'greedy', transformHeader: (h) => h.trim() });
  if (result.errors.some((e) => e.type === 'Quotes')) {
    throw importError('import/malformed', 'The CSV read-out has a quote that is never closed. Check the quotes and export it again.');
  }
  const headers = (result.meta.fields ?? []).filter((h) => h !== '');
  if (!headers.length || !result.data.length) throw importError('import/empty', 'The CSV read-out has no rows under its header.');
  if (result.data.length > IMPORT_MAX_ROWS) throw importError('import/too-many-rows', `The read-out has more than ${IMPORT_MAX_ROWS} rows. Split it and import each part.`);
  const columns = mapColumns(headers);
  const mismatch = new Map<number, string>();
  for (const e of result.errors) {
    if (e.type === 'FieldMismatch' && e.row !== undefined) mismatch.set(e.row, `This row has ${e.code === 'TooFewFields' ? 'fewer' : 'more'} cells than the header.`);
  }
  const records = result.data.map((record, i) => ({ row: i + 1, record, problems: mismatch.has(i) ? [mismatch.get(i)!] : [] }));
  return { rows: toRaw(records, columns), columns: describe(columns) };
}

const CSV_TYPES = ['text/csv', 'text/plain', 'application/csv', 'text/tab-separated-values', 'application/vnd.ms-excel'];

/** Reads an uploaded read-out: CSV or JSON (by extension, type or content), UTF-8 text, at most IMPORT_MAX_BYTES. */
export function parseReadoutFile(file: ReadoutFile): Parsed {
  if (file.buffer.length > IMPORT_MAX_BYTES) {
    throw importError('import/too-large', `The file is larger than ${IMPORT_MAX_BYTES / 1024 / 1024} MB. Split the read-out and import each part.`);
  }
  if (!file.buffer.length) throw importError('import/empty', 'The file is empty.');
  const ext = path.extname(file.originalname ?? '').toLowerCase().slice(1);
  const type = (file.mimetype ?? '').toLowerCase();
  const named = file.originalname ? `"${file.originalname}"` : 'The file';
  const notReadout = () =>
    importError('import/unsupported-type', `${named} is not a CSV or JSON file. Export the read-out as CSV or JSON and send it again.`);
  let kind: 'csv' | 'json' | 'sniff';
  if (ext === 'json') kind = 'json';
  else if (['csv', 'txt', 'tsv'].includes(ext)) kind = 'csv';
  else if (ext) throw notReadout();
  else if (type.includes('json')) kind = 'json';
  else if (CSV_TYPES.includes(type)) kind = 'csv';
  else kind = 'sniff';
  let text: string;
  try {
    if (file.buffer.includes(0)) throw new Error('binary');
    text = new TextDecoder('utf-8', { fatal: true }).decode(file.buffer).replace(/^\uFEFF/, '');
  } catch {
    throw notReadout();
  }
  if (kind === 'sniff') kind = /^\s*[[{]/.test(text) ? 'json' : 'csv';
  if (kind === 'csv') return parseCsvRows(text);
  let value: unknown;
  try {
    value = JSON.parse(text);
  } catch (err) {
    throw importError('import/malformed', `The JSON read-out does not parse: ${(err as Error).message}.`);
  }
  return parseJsonRows(value);
}

// ---- Checking rows against the program ------------------------------------------------------

type AssetRow = { id: string; tag: string; vin: string | null; kind: AssetKind; stage_id: string };
type Planned = { row: ImportRow; write: FlashWrite | null };

const VALUE_FIELDS = ['softwareVersion', 'softwareNumber', 'hardwareNumber', 'ecuSerial'] as const;
const VALUE_NAMES = { softwareNumber: 'Software number (F188)', hardwareNumber: 'Hardware number (F191)', ecuSerial: 'ECU serial number (F18C)' };
const FUTURE_SLACK_MS = 5 * 60 * 1000;

function checkValues(raw: RawRow, now: Date): { problems: string[]; flashedAt: Date } {
  const problems = [...raw.problems];
  const v = raw.values;
  if (!v.ecu) problems.push('No ECU code.');
  if (!v.tag && !v.vin) problems.push('No asset tag and no VIN (F190).');
  if (!v.softwareVersion) problems.push('No software version (F189).');
  else {
    const parsed = SoftwareVersionSchema.safeParse(v.softwareVersion);
    if (!parsed.success) problems.push(`Software version (F189): ${parsed.error.issues[0].message}`);
  }
  for (const field of ['softwareNumber', 'hardwareNumber', 'ecuSerial'] as const) {
    const value = v[field];
    if (value && (value.length > 64 || !/^[\x20-\x7E]*$/.test(value))) {
      problems.push(`${VALUE_NAMES[field]}: use at most 64 printable characters.`);
    }
  }
  let flashedAt = now;
  if (v.flashedAt) {
    const at = new Date(v.flashedAt);
    if (Number.isNaN(at.getTime())) problems.push(`The time "${v.flashedAt.slice(0, 40)}" is not a date and time like 2026-12-02T14:30:00Z.`);
    else if (at.getTime() > now.getTime() + FUTURE_SLACK_MS) problems.push('The time of the read-out is in the future.');
    else flashedAt = at;
  }
  return { problems, flashedAt };
}

const normVin = (vin: string | undefined) => (vin ?? '').toUpperCase().replace(/\s+/g, '');

/**
 * Checks every row against the program (four statements whatever the number of rows: ECUs,
 * assets, installed software, released baselines) and plans the writes. With `lock`, the
 * installed rows read are locked until the caller's transaction ends.
 */
async function plan(deps: Deps, programId: string, parsed: Parsed, userId: string, source: string, transaction?: Transaction): Promise<Planned[]> {
  const now = new Date();
  const ecus = await loadEcus(deps, programId, transaction);
  const ecuByCode = new Map(ecus.map((e) => [e.code, e]));
  const tags = [...new Set(parsed.rows.map((r) => r.values.tag?.toUpperCase()).filter((t): t is string => !!t))];
  const vins = [...new Set(parsed.rows.map((r) => normVin(r.values.vin)).filter((v) => v.length > 0))];
  const assets = await deps.sequelize.query<AssetRow>(
    `SELECT id, tag, vin, kind, stage_id FROM assets WHERE program_id = $1 AND (tag = ANY($2::text[]) OR vin = ANY($3::text[]))`,
    { bind: [programId, tags, vins], type: QueryTypes.SELECT, transaction },
  );
  const byTag = new Map(assets.map((a) => [a.tag, a]));
  const byVin = new Map<string, AssetRow[]>();
  for (const a of assets) if (a.vin) byVin.set(a.vin, [...(byVin.get(a.vin) ?? []), a]);
  const installed = await loadInstalled(deps, assets.map((a) => a.id), transaction, !!transaction);
  const current = new Map(installed.map((r) => [`${r.asset_id}|${r.ecu_id}`, r]));
  const baselines = await loadReleasedBaselines(deps, programId, undefined, transaction);

  const seen = new Map<string, { row: number; after: ReadValues }>();
  const planned: Planned[] = parsed.rows.map((raw): Planned => {
    const { problems, flashedAt } = checkValues(raw, now);
    const tag = raw.values.tag ? raw.values.tag.toUpperCase() : null;
    const vin = normVin(raw.values.vin) || null;
    const ecuCode = raw.values.ecu ? raw.values.ecu.toUpperCase() : null;
    const unknown: string[] = [];
    let asset: AssetRow | undefined;
    if (tag) {
      asset = byTag.get(tag);
      if (!asset) unknown.push(`No asset ${tag} in this program.`);
      else if (vin && asset.vin && asset.vin !== vin) unknown.push(`The VIN read (F190) ${vin} does not match the VIN of ${asset.tag} (${asset.vin}).`);
    } else if (vin) {
      const found = byVin.get(vin) ?? [];
      if (found.length === 1) asset = found[0];
      else unknown.push(found.length ? `More than one asset has the VIN ${vin}: give the asset tag.` : `No asset with the VIN ${vin} in this program.`);
    }
    const ecu = ecuCode ? ecuByCode.get(ecuCode) : undefined;
    if (ecuCode && !ecu) unknown.push(`No ECU with the code ${ecuCode} in this program's catalogue.`);
    const base: ImportRow = {
      row: raw.row,
      outcome: 'invalid',
      reasons: [...problems, ...unknown],
      assetId: unknown.length ? null : (asset?.id ?? null),
      tag: asset?.tag ?? tag,
      vin,
      ecuId: ecu?.id ?? null,
      ecuCode,
      before: null,
      after: null,
      changes: [],
      status: null,
    };
    if (problems.length) return { row: base, write: null };
    if (unknown.length || !asset || !ecu) return { row: { ...base, outcome: 'unknown' }, write: null };

    const key = `${asset.id}|${ecu.id}`;
    const existing = current.get(key);
    const before = existing ? readValues(existing) : null;
    const after: ReadValues = {
      softwareVersion: raw.values.softwareVersion!,
      // A value the read-out left empty keeps what was recorded, except the software number of another version.
      softwareNumber: raw.values.softwareNumber || (before && before.softwareVersion === raw.values.softwareVersion ? before.softwareNumber : ''),
      hardwareNumber: raw.values.hardwareNumber || before?.hardwareNumber || '',
      ecuSerial: raw.values.ecuSerial || before?.ecuSerial || '',
    };
    const changes = VALUE_FIELDS.filter((f) => (before?.[f] ?? '') !== after[f] || (!before && f === 'softwareVersion'));
    const row: ImportRow = { ...base, assetId: asset.id, tag: asset.tag, reasons: [], before, after, changes };
    if (asset.vin === null && vin) row.reasons.push(`${asset.tag} has no VIN recorded; the read-out says ${vin}.`);
    const earlier = seen.get(key);
    if (earlier) {
      const same = VALUE_FIELDS.every((f) => earlier.after[f] === after[f]);
      if (same) return { row: { ...row, outcome: 'unchanged', changes: [], reasons: [...row.reasons, `Same reading as row ${earlier.row}.`] }, write: null };
      return { row: { ...row, outcome: 'invalid', reasons: [...row.reasons, `Row ${earlier.row} gives another reading for ${ecu.code} on ${asset.tag}.`] }, write: null };
    }
    seen.set(key, { row: raw.row, after });
    if (!changes.length) return { row: { ...row, outcome: 'unchanged' }, write: null };
    return {
      row: { ...row, outcome: 'change' },
      write: {
        programId,
        assetId: asset.id,
        ecuId: ecu.id,
        ecuCode: ecu.code,
        ...after,
        flashedAt,
        flashedBy: userId,
        source: 'import',
        note: `Imported from ${source}, row ${raw.row}.`,
        before,
      },
    };
  });

  // The status each read version will have, with every change of the file applied.
  const assetById = new Map(assets.map((a) => [a.id, a]));
  const afterByAsset = new Map<string, Record<string, string>>();
  for (const r of installed) afterByAsset.set(r.asset_id, { ...afterByAsset.get(r.asset_id), [r.ecu_id]: r.software_version });
  for (const p of planned) {
    if (p.write) afterByAsset.set(p.write.assetId, { ...afterByAsset.get(p.write.assetId), [p.write.ecuId]: p.write.softwareVersion });
  }
  const evaluations = new Map<string, ReturnType<typeof evaluateAsset>>();
  for (const p of planned) {
    const { assetId, ecuId, outcome } = p.row;
    if (!assetId || !ecuId || (outcome !== 'change' && outcome !== 'unchanged')) continue;
    const asset = assetById.get(assetId)!;
    if (!evaluations.has(assetId)) {
      evaluations.set(assetId, evaluateAsset({ kind: asset.kind, stageId: asset.stage_id }, afterByAsset.get(assetId) ?? {}, ecus, baselines.get(asset.stage_id)));
    }
    p.row.status = evaluations.get(assetId)!.cells.find((c) => c.ecu.id === ecuId)?.conformance.status ?? null;
  }
  return planned;
}

function summarise(rows: ImportRow[]) {
  const summary: Record<ImportOutcome, number> = { change: 0, unchanged: 0, unknown: 0, invalid: 0 };
  for (const r of rows) summary[r.outcome] += 1;
  return summary;
}

export async function previewImport(deps: Deps, user: SessionUser, programId: string, parsed: Parsed): Promise<ImportPreview> {
  assertMember(user, programId, 'This program');
  const planned = await plan(deps, programId, parsed, user.id, 'preview');
  const rows = planned.map((p) => p.row);
  return { rows, summary: summarise(rows), columns: parsed.columns };
}

/** Rows listed in the refusal of an apply; the preview shows all. */
const REFUSAL_ROWS = 200;

/**
 * Applies a read-out in one transaction. Rows that are unknown or invalid stop the whole
 * import (400 listing them) unless `skipInvalid`, in which case they are left out.
 */
export async function applyImport(
  deps: Deps,
  user: SessionUser,
  programId: string,
  parsed: Parsed,
  skipInvalid: boolean,
  source: string,
): Promise<ImportResult> {
  assertMember(user, programId, 'This program');
  return deps.sequelize.transaction(async (transaction) => {
    const planned = await plan(deps, programId, parsed, user.id, source, transaction);
    const rows = planned.map((p) => p.row);
    const summary = summarise(rows);
    const refused = rows.filter((r) => r.outcome === 'unknown' || r.outcome === 'invalid');
    if (refused.length && !skipInvalid) {
      const list = refused.slice(0, 5).map((r) => `row ${r.row}: ${r.reasons[0] ?? r.outcome}`).join('; ');
      throw new AppError(
        400,
        'import/invalid-rows',
        `Nothing was imported: ${refused.length} row${refused.length === 1 ? '' : 's'} cannot be (${list}${refused.length > 5 ? '; ...' : ''}). ` +
          'Correct them, or import again choosing to skip them.',
        { rows: refused.slice(0, REFUSAL_ROWS), refused: refused.length, summary },
      );
    }
    const writes = planned.map((p) => p.write).filter((w): w is FlashWrite => w !== null);
    await writeFlashes(deps, writes, user.id, transaction);
    return { rows, summary, columns: parsed.columns, applied: writes.length, skipped: refused.length };
  });
}
