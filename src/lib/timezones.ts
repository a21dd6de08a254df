/**
 * Wall-clock time in a named time zone ↔ an instant, with nothing but Intl.
 * Used by the due-date field: the instructor picks a date, a time and a zone;
 * the server gets an ISO instant with its offset (2027-03-01T17:00:00+01:00).
 */

export function browserTimeZone(): string {
  return Intl.DateTimeFormat().resolvedOptions().timeZone || 'UTC';
}

export function timeZoneNames(): string[] {
  const names = typeof Intl.supportedValuesOf === 'function' ? Intl.supportedValuesOf('timeZone') : [];
  return names.includes('UTC') ? names : ['UTC', ...names];
}

interface Wall {
  year: number;
  month: number;
  day: number;
  hour: number;
  minute: number;
  second: number;
}

function wallIn(ms: number, timeZone: string): Wall {
  const parts = new Intl.DateTimeFormat('en-US', {
    timeZone,
    hourCycle: 'h23',
    year: 'numeric',
    month: '2-digit',
    day: '2-digit',
    hour: '2-digit',
    minute: '2-digit',
    second: '2-digit',
  }).formatToParts(new Date(ms));
  const get = (t: string) => Number(parts.find((p) => p.type === t)?.value ?? 0);
  return { year: get('year'), month: get('month'), day: get('day'), hour: get('hour') % 24, minute: get('minute'), second: get('second') };
}

/** Offset of `timeZone` from UTC at the instant `ms`, in minutes (east positive). */
export function offsetMinutes(ms: number, timeZone: string): number {
  const w = wallIn(ms, timeZone);
  const asUtc = Date.UTC(w.year, w.month - 1, w.day, w.hour, w.minute, w.second);
  return Math.round((asUtc - Math.floor(ms / 1000) * 1000) / 60000);
}

const pad = (n: number, w = 2) => String(Math.abs(n)).padStart(w, '0');

/**
 * "2027-03-01T17:00" read as wall time in `timeZone` → "2027-03-01T17:00:00+01:00".
 * A time skipped by a clock change moves forward by the gap; null when the input is not a date.
 */
export function zonedWallToIso(local: string, timeZone: string): string | null {
  const m = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})/.exec(local);
  if (!m) return null;
  const [y, mo, d, h, mi] = m.slice(1).map(Number);
  const wallAsUtc = Date.UTC(y, mo - 1, d, h, mi);
  let guess = wallAsUtc - offsetMinutes(wallAsUtc, timeZone) * 60000;
  guess = wallAsUtc - offsetMinutes(guess, timeZone) * 60000;
  const off = offsetMinutes(guess, timeZone);
  const w = wallIn(guess, timeZone);
  const sign = off < 0 ? '-' : '+';
  return `${w.year}-${pad(w.month)}-${pad(w.day)}T${pad(w.hour)}:${pad(w.minute)}:00${sign}${pad(Math.trunc(off / 60))}:${pad(off % 60)}`;
}

/** An instant → "2027-03-01T17:00" as wall time in `timeZone` (for a datetime-local input). */
export function isoToZonedWall(iso: string, timeZone: string): string {
  const ms = Date.parse(iso);
  if (Number.isNaN(ms)) return '';
  const w = wallIn(ms, timeZone);
  return `${w.year}-${pad(w.month)}-${pad(w.day)}T${pad(w.hour)}:${pad(w.minute)}`;
}

/** "Mon 1 Mar 2027, 17:00 CET" in the given zone (the reader's when absent). */
export function formatInZone(iso: string, timeZone?: string): string {
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return iso;
  return new Intl.DateTimeFormat('en-GB', {
    weekday: 'short',
    day: 'numeric',
    month: 'short',
    year: 'numeric',
    hour: '2-digit',
    minute: '2-digit',
    timeZone,
    timeZoneName: 'short',
  }).format(d);
}

/** "3 days 4 hours", "2 hours 5 minutes", "45 minutes" until (or since) an instant. */
export function describeDuration(ms: number): string {
  const a = Math.abs(ms);
  const min = Math.floor(a / 60000);
  const d = Math.floor(min / 1440);
  const h = Math.floor((min % 1440) / 60);
  const m = min % 60;
  const unit = (n: number, w: string) => `${n} ${w}${n === 1 ? '' : 's'}`;
  if (d > 0) return h > 0 ? `${unit(d, 'day')} ${unit(h, 'hour')}` : unit(d, 'day');
  if (h > 0) return m > 0 ? `${unit(h, 'hour')} ${unit(m, 'minute')}` : unit(h, 'hour');
  if (min > 0) return unit(m, 'minute');
  return 'less than a minute';
}
