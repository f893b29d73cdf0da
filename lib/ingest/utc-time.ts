// the usual GPX form, already UTC: normalised by hand, as Date parsing costs more than the XML does
const UTC_FAST = /^\d{4}-(0[1-9]|1[0-2])-(0[1-9]|[12]\d|3[01])T([01]\d|2[0-3]):[0-5]\d:[0-5]\d(\.\d{1,3})?Z$/;
const HAS_ZONE = /(Z|[+-]\d{2}(:?\d{2})?)$/i;
const DATE_TIME = /^(\d{4})-(\d{2})-(\d{2})(?:[T ](\d{2}):(\d{2})(?::(\d{2})(\.\d+)?)?)?/;

/**
 * An xsd:dateTime-like string as ISO 8601 UTC, or null when it is not a date.
 *
 * A time without a zone is read as UTC (the GPX and KML specifications say so, and it keeps
 * the result independent of the server's time zone).
 *
 * @example
 * toUtcIso('2024-05-01T12:00:00+02:00'); // '2024-05-01T10:00:00.000Z'
 * toUtcIso('2024-05-01 10:00:00'); // '2024-05-01T10:00:00.000Z'
 */
export function toUtcIso(value: string | null | undefined): string | null {
  const s = value?.trim();
  if (!s) return null;
  if (UTC_FAST.test(s)) {
    const dot = s.indexOf('.', 19);
    return dot < 0 ? `${s.slice(0, 19)}.000Z` : `${s.slice(0, 19)}.${s.slice(20, -1).padEnd(3, '0')}Z`;
  }
  if (!DATE_TIME.test(s)) return null;
  let iso = s.replace(' ', 'T');
  if (/^\d{4}-\d{2}-\d{2}$/.test(iso)) iso += 'T00:00:00';
  if (!HAS_ZONE.test(iso)) iso += 'Z';
  const ms = Date.parse(iso);
  return Number.isFinite(ms) ? new Date(ms).toISOString() : null;
}
