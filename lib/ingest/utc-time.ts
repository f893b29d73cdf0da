import { IngestError } from './types';

// the usual GPX form, already UTC: normalised by hand, as Date parsing costs more than the XML does
const UTC_FAST = /^\d{4}-(0[1-9]|1[0-2])-(0[1-9]|[12]\d|3[01])T([01]\d|2[0-3]):[0-5]\d:[0-5]\d(\.\d{1,3})?Z$/;
const HAS_ZONE = /(Z|[+-]\d{2}(:?\d{2})?)$/i;
const DATE_TIME = /^(\d{4})-(\d{2})-(\d{2})(?:[T ](\d{2}):(\d{2})(?::(\d{2})(\.\d+)?)?)?/;
const MONTHS = ['January', 'February', 'March', 'April', 'May', 'June', 'July', 'August', 'September', 'October', 'November', 'December'];

/**
 * Days in month `m` (1–12) of year `y`, by the Gregorian calendar's leap rule: a year divisible by 4 is a
 * leap year, except a year divisible by 100 that is not divisible by 400 [published: the Gregorian
 * calendar (Inter gravissimas, 1582), which ISO 8601 and XML Schema's dateTime use for every year].
 * `daysInMonth(2024, 2)` → 29, `daysInMonth(1900, 2)` → 28, `daysInMonth(2000, 2)` → 29
 */
export function daysInMonth(y: number, m: number): number {
  if (m === 2) return y % 4 === 0 && (y % 100 !== 0 || y % 400 === 0) ? 29 : 28;
  return m === 4 || m === 6 || m === 9 || m === 11 ? 30 : 31;
}

/** The two digits of s at i as a number (the caller has matched them as digits). */
const two = (s: string, i: number) => (s.charCodeAt(i) - 48) * 10 + s.charCodeAt(i + 1) - 48;

/**
 * Why a value shaped like a date and time (YYYY-MM-DD, then optionally hh:mm[:ss]) names no real day or
 * clock time, or null when it names one or is not shaped like a date at all. Hour 24 is allowed only as
 * 24:00:00, the end of the day, as XML Schema's dateTime allows it.
 * `timeProblem('2024-02-30 07:30')` → 'February 2024 has 29 days'
 */
export function timeProblem(value: string | null | undefined): string | null {
  const m = value ? DATE_TIME.exec(value.trim()) : null;
  if (!m) return null;
  const [y, mo, d] = [Number(m[1]), Number(m[2]), Number(m[3])];
  if (mo < 1 || mo > 12) return `there is no month ${m[2]}`;
  const days = daysInMonth(y, mo);
  if (d < 1 || d > days) return d < 1 ? `there is no day ${m[3]}` : `${MONTHS[mo - 1]} ${m[1]} has ${days} days`;
  if (m[4] === undefined) return null;
  const [h, mi, s] = [Number(m[4]), Number(m[5]), m[6] === undefined ? 0 : Number(m[6])];
  const fraction = m[7] === undefined ? 0 : Number(m[7]);
  if (h === 24 && mi === 0 && s === 0 && fraction === 0) return null;
  if (h > 23) return `there is no hour ${m[4]}`;
  if (mi > 59) return `there is no minute ${m[5]}`;
  if (s > 59) return `there is no second ${m[6]}`;
  return null;
}

/**
 * An xsd:dateTime-like string as ISO 8601 UTC, or null when it is not a date. A value shaped like a date
 * that names no real day or time (2024-02-30, 25:10) is not a date either: timeProblem says why.
 *
 * A time without a zone is read as UTC (the GPX and KML specifications say so, and it keeps
 * the result independent of the server's time zone).
 *
 * @example
 * toUtcIso('2024-05-01T12:00:00+02:00'); // '2024-05-01T10:00:00.000Z'
 * toUtcIso('2024-05-01 10:00:00'); // '2024-05-01T10:00:00.000Z'
 * toUtcIso('2024-02-31T07:30:00Z'); // null
 */
export function toUtcIso(value: string | null | undefined): string | null {
  const s = value?.trim();
  if (!s) return null;
  if (UTC_FAST.test(s)) {
    // the pattern bounds the month to 1–12 and the day to 1–31; only days 29–31 can be past the month's end
    const day = two(s, 8);
    if (day > 28 && day > daysInMonth(Number(s.slice(0, 4)), two(s, 5))) return null;
    const dot = s.indexOf('.', 19);
    return dot < 0 ? `${s.slice(0, 19)}.000Z` : `${s.slice(0, 19)}.${s.slice(20, -1).padEnd(3, '0')}Z`;
  }
  // Date.parse rolls an impossible day over into the next month (2024-02-31 → 2 March): refuse it first
  if (!DATE_TIME.test(s) || timeProblem(s) !== null) return null;
  let iso = s.replace(' ', 'T');
  if (/^\d{4}-\d{2}-\d{2}$/.test(iso)) iso += 'T00:00:00';
  if (!HAS_ZONE.test(iso)) iso += 'Z';
  const ms = Date.parse(iso);
  return Number.isFinite(ms) ? new Date(ms).toISOString() : null;
}

/** A time in a file that names no real day or clock time: where it is, as written, and why. */
export interface BadTime {
  where: string;
  value: string;
  reason: string;
}

/**
 * Notes `value` in `into` when it is shaped like a date but names no real day or time; call it where toUtcIso
 * gave null for a value that was there. Values not shaped like a date are left alone, as before: no time.
 * `noteBadTime('2023-02-29T10:00:00Z', 'row 4', bad)` → bad gets { where: 'row 4', value, reason: 'February 2023 has 28 days' }
 */
export function noteBadTime(value: string, where: string, into: BadTime[]): void {
  const reason = timeProblem(value);
  if (reason) into.push({ where, value: value.trim(), reason });
}

/**
 * toUtcIso of each of a line's times, noting those that name no real day or time as `${where} time ${j + 1}`.
 * `timesToUtc(['2024-05-01T10:00:00Z', '2024-04-31T10:00:00Z'], "placemark 1 'A'", bad)` → ['2024-05-01T10:00:00.000Z', null], one in bad
 */
export function timesToUtc(values: readonly unknown[], where: string, into: BadTime[]): (string | null)[] {
  const out: (string | null)[] = [];
  for (let j = 0; j < values.length; j++) {
    const v = values[j] === null || values[j] === undefined ? '' : String(values[j]);
    const t = toUtcIso(v);
    if (t === null && v.trim() !== '') noteBadTime(v, `${where} time ${j + 1}`, into);
    out.push(t);
  }
  return out;
}

/** toUtcIso of one feature's time, noting it as `where` when it names no real day or time. */
export function timeToUtc(value: unknown, where: string, into: BadTime[]): string | null {
  if (typeof value !== 'string') return null;
  const t = toUtcIso(value);
  if (t === null && value.trim() !== '') noteBadTime(value, where, into);
  return t;
}

/**
 * One 'malformed' error (422) for the impossible times of a file, naming the first and listing up to 50:
 * stored as is they would fail in the database, and rolled over they would put fixes on the wrong day.
 * `badTimesError([{ where: 'row 4', value: '2024-02-31 07:30', reason: 'February 2024 has 29 days' }]).message`
 * → "1 time names a day or time that does not exist: row 4: '2024-02-31 07:30' (February 2024 has 29 days)"
 */
export function badTimesError(bad: BadTime[]): IngestError {
  const first = bad[0];
  const n = bad.length;
  return new IngestError('malformed', `${n} time${n === 1 ? ' names' : 's name'} a day or time that does not exist: ${first.where}: '${first.value}' (${first.reason})`, {
    count: n,
    problems: bad.slice(0, 50),
  });
}
