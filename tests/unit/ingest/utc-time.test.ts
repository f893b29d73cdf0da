import { execFileSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import { IngestError, parseGeoJson, parseSurveyCsv } from '@/lib/ingest';
import { badTimesError, daysInMonth, timeProblem, toUtcIso } from '@/lib/ingest/utc-time';

/**
 * Python's datetime as the reference calendar [Python datetime: the proleptic Gregorian calendar, years
 * 1–9999]: each value read with datetime.fromisoformat (a value without a zone taken as UTC, as toUtcIso
 * does), printed as toISOString would print it, or None where Python refuses it.
 */
function pythonUtc(values: string[]): (string | null)[] {
  const script = `
import json, sys
from datetime import datetime, timezone
out = []
for v in json.load(sys.stdin):
    try:
        d = datetime.fromisoformat(v)
    except ValueError:
        out.append(None)
        continue
    d = d.replace(tzinfo=timezone.utc) if d.tzinfo is None else d.astimezone(timezone.utc)
    out.append(f"{d.year:04d}-{d.month:02d}-{d.day:02d}T{d.hour:02d}:{d.minute:02d}:{d.second:02d}.{d.microsecond // 1000:03d}Z")
print(json.dumps(out))
`;
  return JSON.parse(execFileSync('python3', ['-c', script], { input: JSON.stringify(values), encoding: 'utf8' }));
}

// leap-rule edge years (divisible by 4, by 100, by 400, neither), the Gregorian reform's year and the ends of the range
const YEARS = [1, 4, 100, 400, 1582, 1600, 1700, 1800, 1900, 1996, 2000, 2023, 2024, 2025, 2100, 2400, 9999];
const pad = (n: number, w = 2) => String(n).padStart(w, '0');

describe('toUtcIso against Python\'s calendar', () => {
  // every day 0–32 of every month 0–13 of the edge years, in the three spellings that take the two paths
  const values: string[] = [];
  for (const y of YEARS) {
    for (let m = 0; m <= 13; m++) {
      for (let d = 0; d <= 32; d++) {
        const date = `${pad(y, 4)}-${pad(m)}-${pad(d)}`;
        values.push(`${date}T07:30:00Z`, `${date}T07:30:00.25Z`, `${date} 07:30`, `${date}T07:30:00+02:00`, date);
      }
    }
  }

  it('accepts exactly the days Python accepts and gives the same instant, on the fast path and the slow one', () => {
    const want = pythonUtc(values);
    const got = values.map((v) => toUtcIso(v));
    const differ = values.flatMap((v, i) => (got[i] === want[i] ? [] : [`${v}: ${got[i]} vs ${want[i]}`]));
    expect(differ).toEqual([]);
    // the comparison covers both outcomes: thousands of real days and hundreds of impossible ones
    expect(want.filter((w) => w !== null).length).toBeGreaterThan(10_000);
    expect(want.filter((w) => w === null).length).toBeGreaterThan(1_000);
  });

  it('says why a value shaped like a date is impossible, exactly where Python refuses it', () => {
    const want = pythonUtc(values);
    const differ = values.filter((v, i) => (timeProblem(v) !== null) !== (want[i] === null));
    expect(differ).toEqual([]);
  });

  it('counts the days of every month as Python\'s calendar.monthrange does, for 2,000 years', () => {
    const py = JSON.parse(
      execFileSync('python3', ['-c', 'import calendar, json; print(json.dumps([[calendar.monthrange(y, m)[1] for m in range(1, 13)] for y in range(1, 2001)]))'], { encoding: 'utf8' }),
    ) as number[][];
    const ours = Array.from({ length: 2000 }, (_, k) => Array.from({ length: 12 }, (_, m) => daysInMonth(k + 1, m + 1)));
    expect(ours).toEqual(py);
  });
});

describe('toUtcIso and timeProblem', () => {
  it('knows leap days: 2024-02-29 is a day, 2023-02-29 and 2024-04-31 are not [published: Gregorian leap rule]', () => {
    expect(toUtcIso('2024-02-29T07:30:00Z')).toBe('2024-02-29T07:30:00.000Z');
    expect(toUtcIso('2024-02-29 07:30')).toBe('2024-02-29T07:30:00.000Z');
    expect(toUtcIso('2023-02-29T07:30:00Z')).toBeNull();
    expect(toUtcIso('2024-04-31T07:30:00Z')).toBeNull();
    expect(toUtcIso('2024-02-31T07:30:00Z')).toBeNull();
    // Date.parse alone would roll this one over to 2 March
    expect(toUtcIso('2024-02-31 07:30')).toBeNull();
    expect(timeProblem('2024-02-31 07:30')).toBe('February 2024 has 29 days');
    expect(timeProblem('2023-02-29')).toBe('February 2023 has 28 days');
    expect(timeProblem('2024-13-01T00:00:00Z')).toBe('there is no month 13');
    expect(timeProblem('2024-05-00')).toBe('there is no day 00');
    expect(timeProblem('2024-05-01 25:10')).toBe('there is no hour 25');
    expect(timeProblem('2024-05-01 10:75')).toBe('there is no minute 75');
    expect(timeProblem('2024-05-01T10:15:61Z')).toBe('there is no second 61');
  });

  it('reads 24:00:00 as the end of the day, as XML Schema\'s dateTime allows [published: XML Schema Part 2, 3.2.7]', () => {
    expect(toUtcIso('2024-02-29T24:00:00')).toBe('2024-03-01T00:00:00.000Z');
    expect(timeProblem('2024-02-29T24:00:00')).toBeNull();
    expect(timeProblem('2024-02-29T24:00:01')).toBe('there is no hour 24');
  });

  it('leaves values that are not shaped like a date alone: no time, and no problem to report', () => {
    for (const v of ['', '   ', 'yesterday', '14/05/2024 07:30', '2024-5-1']) {
      expect(toUtcIso(v)).toBeNull();
      expect(timeProblem(v)).toBeNull();
    }
  });

  it('makes one 422-class error naming the first impossible value and where it is', () => {
    const e = badTimesError([
      { where: 'row 4', value: '2024-02-31 07:30', reason: 'February 2024 has 29 days' },
      { where: 'row 9', value: '2023-02-29', reason: 'February 2023 has 28 days' },
    ]);
    expect(e).toBeInstanceOf(IngestError);
    expect([e.code, e.message]).toEqual(['malformed', "2 times name a day or time that does not exist: row 4: '2024-02-31 07:30' (February 2024 has 29 days)"]);
  });
});

describe('the parsers refuse a file with an impossible time', () => {
  const opts = { resolveCrs: async () => undefined, limits: { maxInflatedBytes: 1 << 20, maxZipEntries: 10 } };

  it('GeoJSON: a point\'s time and a line\'s coordinate times', async () => {
    const point = JSON.stringify({ type: 'Feature', properties: { name: 'HH 3', time: '2023-02-29T10:00:00Z' }, geometry: { type: 'Point', coordinates: [9.5, 51] } });
    await expect(parseGeoJson(point, opts)).rejects.toThrow("1 time names a day or time that does not exist: feature 1 'HH 3' property time: '2023-02-29T10:00:00Z' (February 2023 has 28 days)");
    const line = JSON.stringify({
      type: 'Feature',
      properties: { coordinateProperties: { times: ['2024-06-30T10:00:00Z', '2024-06-31T10:00:05Z'] } },
      geometry: { type: 'LineString', coordinates: [[9.5, 51], [9.5001, 51]] },
    });
    await expect(parseGeoJson(line, opts)).rejects.toThrow("feature 1 time 2: '2024-06-31T10:00:05Z' (June 2024 has 30 days)");
    // the same line on a real day is read, its times in UTC
    const ok = await parseGeoJson(line.replace('06-31', '07-01'), opts);
    expect(ok.features[0]).toMatchObject({ times: ['2024-06-30T10:00:00.000Z', '2024-07-01T10:00:05.000Z'] });
  });

  it('survey CSV: the row and the value', async () => {
    const csv = 'id,lat,lon,date\n1,51.0,9.5,2024-02-29 07:30\n2,51.0001,9.5001,2100-02-29 07:31\n';
    await expect(parseSurveyCsv(csv, opts)).rejects.toThrow("row 3: time '2100-02-29 07:31' names a day or time that does not exist (February 2100 has 28 days)");
    const ok = await parseSurveyCsv(csv.replace('2100', '2000'), opts);
    expect(ok.features.map((f) => (f.kind === 'point' ? f.time : null))).toEqual(['2024-02-29T07:30:00.000Z', '2000-02-29T07:31:00.000Z']);
  });
});
