// Times on the fleet pages are read and typed in the device's own time zone and sent as UTC
// instants; the server's e-mails and refusals say UTC, so the pages name the zone they use.

export const DAY_MS = 24 * 3600_000;
export const HOUR_MS = 3600_000;

const pad = (n: number) => String(n).padStart(2, '0');

/** Local calendar day as `YYYY-MM-DD`. */
export function dayKey(date: Date): string {
  return `${date.getFullYear()}-${pad(date.getMonth() + 1)}-${pad(date.getDate())}`;
}

/** Local midnight of a `YYYY-MM-DD` day, or null when it is not a real date. */
export function parseDay(value: string | undefined | null): Date | null {
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(value?.trim() ?? '');
  if (!m) return null;
  const date = new Date(Number(m[1]), Number(m[2]) - 1, Number(m[3]));
  return dayKey(date) === value?.trim() ? date : null;
}

export function startOfDay(date: Date): Date {
  return new Date(date.getFullYear(), date.getMonth(), date.getDate());
}

/** Calendar days, not 24-hour steps, so a change to or from summer time keeps midnight. */
export function addDays(date: Date, days: number): Date {
  return new Date(date.getFullYear(), date.getMonth(), date.getDate() + days, date.getHours(), date.getMinutes());
}

/** What a date-time input holds: `YYYY-MM-DDTHH:MM` in local time. */
export function toLocalInput(value: Date | string): string {
  const date = typeof value === 'string' ? new Date(value) : value;
  if (Number.isNaN(date.getTime())) return '';
  return `${dayKey(date)}T${pad(date.getHours())}:${pad(date.getMinutes())}`;
}

/**
 * A typed local date and time (`2026-12-03 08:00` or `2026-12-03T08:00`) as a UTC instant, or
 * null when it is not one.
 */
export function fromLocalInput(value: string): string | null {
  const m = /^(\d{4})-(\d{2})-(\d{2})[T ](\d{1,2}):(\d{2})$/.exec(value.trim());
  if (!m) return null;
  const [year, month, day, hour, minute] = m.slice(1).map(Number);
  if (hour > 23 || minute > 59) return null;
  const date = new Date(year, month - 1, day, hour, minute);
  if (date.getFullYear() !== year || date.getMonth() !== month - 1 || date.getDate() !== day) return null;
  return date.toISOString();
}

/** "UTC+01:00" for the device's zone at `at`. */
export function zoneName(at: Date = new Date()): string {
  const offset = -at.getTimezoneOffset();
  const sign = offset >= 0 ? '+' : '-';
  const abs = Math.abs(offset);
  return `UTC${sign}${pad(Math.floor(abs / 60))}:${pad(abs % 60)}`;
}

const timeFormat = new Intl.DateTimeFormat('en-GB', { hour: '2-digit', minute: '2-digit' });
const dayFormat = new Intl.DateTimeFormat('en-GB', { weekday: 'short', day: 'numeric', month: 'short' });
const longDayFormat = new Intl.DateTimeFormat('en-GB', { weekday: 'long', day: 'numeric', month: 'long', year: 'numeric' });

export const formatTime = (value: string | Date) => timeFormat.format(new Date(value));
/** "Thu 3 Dec". */
export const formatDay = (value: string | Date) => dayFormat.format(new Date(value));
/** "Thursday 3 December 2026". */
export const formatLongDay = (value: string | Date) => longDayFormat.format(new Date(value));
/** "Thu 3 Dec, 08:00". */
export const formatDayTime = (value: string | Date) => `${formatDay(value)}, ${formatTime(value)}`;

/** "Thu 3 Dec, 08:00 to 17:00", or "Thu 3 Dec, 08:00 to Sat 5 Dec, 17:00". */
export function formatWindow(startsAt: string, endsAt: string): string {
  const start = new Date(startsAt);
  const end = new Date(endsAt);
  const sameDay = dayKey(start) === dayKey(end);
  return sameDay ? `${formatDayTime(start)} to ${formatTime(end)}` : `${formatDayTime(start)} to ${formatDayTime(end)}`;
}

/** "2 h 30 min", "3 days 4 h". */
export function formatDuration(ms: number): string {
  const minutes = Math.round(ms / 60_000);
  const days = Math.floor(minutes / 1440);
  const hours = Math.floor((minutes % 1440) / 60);
  const mins = minutes % 60;
  const parts: string[] = [];
  if (days) parts.push(days === 1 ? '1 day' : `${days} days`);
  if (hours) parts.push(`${hours} h`);
  if (mins && !days) parts.push(`${mins} min`);
  return parts.join(' ') || '0 min';
}

/** Hours with one decimal: "36.5 h". */
export function formatHours(hours: number): string {
  return `${(Math.round(hours * 10) / 10).toLocaleString('en-GB', { maximumFractionDigits: 1 })} h`;
}
