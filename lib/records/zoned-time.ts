/**
 * Times in a project's own time zone (an IANA name such as `Europe/Berlin`), whatever zone the browser or
 * the server runs in: one written form on every screen, and wall-clock times typed in the project's zone
 * read back as the instants they name.
 */

const formatters = new Map<string, Intl.DateTimeFormat>();

function formatter(timeZone: string): Intl.DateTimeFormat {
  let f = formatters.get(timeZone);
  if (!f) {
    f = new Intl.DateTimeFormat('en-GB', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit', hour: '2-digit', minute: '2-digit', second: '2-digit', hourCycle: 'h23' });
    formatters.set(timeZone, f);
  }
  return f;
}

/** The wall-clock fields of an instant (epoch milliseconds) in a time zone. */
function wallFields(ms: number, timeZone: string): [number, number, number, number, number, number] {
  const parts = Object.fromEntries(formatter(timeZone).formatToParts(new Date(ms)).map((p) => [p.type, p.value]));
  return [Number(parts.year), Number(parts.month), Number(parts.day), Number(parts.hour), Number(parts.minute), Number(parts.second)];
}

const pad = (n: number, w = 2) => String(n).padStart(w, '0');

/**
 * An instant as the wall-clock time of the zone, `YYYY-MM-DD HH:MM:SS` (or with a `T`, the form of an
 * `<input type="datetime-local">`), e.g. `formatInZone('2026-11-05T09:00:38Z', 'Europe/Berlin')` →
 * `'2026-11-05 10:00:38'`.
 */
export function formatInZone(instant: string | number | Date, timeZone: string, separator: ' ' | 'T' = ' '): string {
  const ms = instant instanceof Date ? instant.getTime() : typeof instant === 'number' ? instant : Date.parse(instant);
  const [y, mo, d, h, mi, s] = wallFields(ms, timeZone);
  return `${pad(y, 4)}-${pad(mo)}-${pad(d)}${separator}${pad(h)}:${pad(mi)}:${pad(s)}`;
}

/** The zone's offset from UTC at an instant, in milliseconds (east positive). */
function offsetAt(ms: number, timeZone: string): number {
  const [y, mo, d, h, mi, s] = wallFields(ms, timeZone);
  return Date.UTC(y, mo - 1, d, h, mi, s) - Math.floor(ms / 1000) * 1000;
}

const WALL = /^(\d{4})-(\d{2})-(\d{2})[T ](\d{2}):(\d{2})(?::(\d{2}))?$/;

/**
 * The instant that a wall-clock time of the zone names, as an ISO string in UTC, or null when the text is
 * not a real date and time. As PostgreSQL reads `timestamp AT TIME ZONE`: a time the clocks skipped (the
 * spring gap) takes the offset in force before the change, and a time the clocks showed twice (the autumn
 * fold) the offset in force after it. `wallTimeToUtc('2026-11-05T10:00:38', 'Europe/Berlin')` →
 * `'2026-11-05T09:00:38.000Z'`.
 */
export function wallTimeToUtc(wall: string, timeZone: string): string | null {
  const m = WALL.exec(wall.trim());
  if (!m) return null;
  const [y, mo, d, h, mi, s] = m.slice(1).map((x) => (x === undefined ? 0 : Number(x)));
  const asUtc = Date.UTC(y, mo - 1, d, h, mi, s);
  const check = new Date(asUtc);
  if (check.getUTCFullYear() !== y || check.getUTCMonth() !== mo - 1 || check.getUTCDate() !== d || h > 23 || mi > 59 || s > 59) return null;
  // the offsets in force a day either side bracket any change of the clocks near this time
  const before = offsetAt(asUtc - 86_400_000, timeZone);
  const after = offsetAt(asUtc + 86_400_000, timeZone);
  const fits = (off: number) => offsetAt(asUtc - off, timeZone) === off;
  let off: number;
  if (fits(before) && fits(after)) off = after; // the fold (or no change at all): the later offset, as PostgreSQL
  else if (fits(before)) off = before;
  else if (fits(after)) off = after;
  else off = before; // the gap: the offset before the change, as PostgreSQL
  return new Date(asUtc - off).toISOString();
}

/** The zone's short name at an instant, e.g. `CET` or `GMT+1`, to say which clock a time is read on. */
export function zoneAbbreviation(instant: number, timeZone: string): string {
  const part = new Intl.DateTimeFormat('en-GB', { timeZone, timeZoneName: 'short' }).formatToParts(new Date(instant)).find((p) => p.type === 'timeZoneName');
  return part?.value ?? timeZone;
}
