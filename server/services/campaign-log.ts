import { CAMPAIGN_LOG_MAX_ROWS, STEP_HOURS_MAX, STEP_KM_MAX, type CampaignLogErrorLine } from '../../shared/schemas/validation';

/** One CSV row with the line it starts on (a quoted cell may run over several lines). */
export type CsvRow = { line: number; cells: string[] };

/**
 * RFC 4180 reading: commas, double quotes (doubled inside a quoted cell), CRLF or LF line ends.
 * Written here rather than taken from a package so that every row knows its line for the errors.
 */
export function readCsv(text: string): CsvRow[] {
  const rows: CsvRow[] = [];
  let line = 1;
  let rowLine = 1;
  let cells: string[] = [];
  let cell = '';
  let quoted = false;
  let i = text.charCodeAt(0) === 0xfeff ? 1 : 0;
  const endRow = () => {
    cells.push(cell);
    rows.push({ line: rowLine, cells });
    cells = [];
    cell = '';
  };
  for (; i < text.length; i++) {
    const c = text[i];
    if (quoted) {
      if (c === '"' && text[i + 1] === '"') {
        cell += '"';
        i++;
      } else if (c === '"') quoted = false;
      else {
        if (c === '\n') line++;
        cell += c;
      }
      continue;
    }
    if (c === '"' && cell.trim() === '') {
      quoted = true;
      cell = '';
    } else if (c === ',') {
      cells.push(cell);
      cell = '';
    } else if (c === '\r' && text[i + 1] === '\n') {
      continue;
    } else if (c === '\n') {
      endRow();
      line++;
      rowLine = line;
    } else cell += c;
  }
  if (cell !== '' || cells.length) endRow();
  return rows;
}

export type LogEntry = { line: number; stepId: string; hours: number; km: number };

const isBlank = (row: CsvRow) => row.cells.every((c) => c.trim() === '');

function readAmount(raw: string | undefined, what: 'hours' | 'km', max: number): { value: number } | { error: string } {
  const text = (raw ?? '').trim();
  if (text === '') return { value: 0 };
  if (/^-\s*[\d.]/.test(text)) return { error: `The ${what} must not be negative (${text}).` };
  // A plain decimal number: no units, no thousands separators, no "1e3".
  if (!/^[+]?\d+(\.\d+)?$|^[+]?\.\d+$/.test(text)) return { error: `"${text}" is not a number of ${what}.` };
  const value = Number(text);
  if (value > max) return { error: `${text} ${what} is more than ${max}.` };
  return { value };
}

/**
 * Reads a run log: rows of `step name, hours, km` (km may be left out), an optional header row
 * first, blank lines skipped. Every bad row is reported with its line; the caller applies nothing
 * unless `errors` is empty.
 */
export function parseCampaignLog(text: string, steps: ReadonlyArray<{ id: string; name: string }>): { entries: LogEntry[]; errors: CampaignLogErrorLine[] } {
  const byName = new Map(steps.map((s) => [s.name.trim().toLowerCase(), s.id]));
  const rows = readCsv(text).filter((r) => !isBlank(r));
  const entries: LogEntry[] = [];
  const errors: CampaignLogErrorLine[] = [];
  if (rows.length && /^\s*step/i.test(rows[0].cells[0] ?? '') && !byName.has((rows[0].cells[0] ?? '').trim().toLowerCase())) rows.shift();
  if (!rows.length) return { entries, errors: [{ line: 1, message: 'The log has no rows.' }] };
  if (rows.length > CAMPAIGN_LOG_MAX_ROWS) {
    return { entries, errors: [{ line: rows[CAMPAIGN_LOG_MAX_ROWS].line, message: `A log may have at most ${CAMPAIGN_LOG_MAX_ROWS} rows.` }] };
  }
  for (const row of rows) {
    const problems: string[] = [];
    if (row.cells.length < 2 || row.cells.length > 3) problems.push(`Expected 2 or 3 columns (step, hours, km); found ${row.cells.length}.`);
    const name = (row.cells[0] ?? '').trim();
    const stepId = byName.get(name.toLowerCase());
    if (!name) problems.push('The step name is empty.');
    else if (!stepId) problems.push(`No step named "${name.slice(0, 120)}" in this campaign.`);
    const hours = readAmount(row.cells[1], 'hours', STEP_HOURS_MAX);
    const km = readAmount(row.cells[2], 'km', STEP_KM_MAX);
    if ('error' in hours) problems.push(hours.error);
    if ('error' in km) problems.push(km.error);
    if ('value' in hours && 'value' in km && hours.value === 0 && km.value === 0 && row.cells.length >= 2) {
      problems.push('Give the hours or the km run.');
    }
    if (problems.length) errors.push({ line: row.line, message: problems.join(' ') });
    else if (stepId && 'value' in hours && 'value' in km) entries.push({ line: row.line, stepId, hours: hours.value, km: km.value });
  }
  return { entries, errors };
}
