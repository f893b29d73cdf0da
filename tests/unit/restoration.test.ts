import { describe, expect, it } from 'vitest';
import { minutesBetween, restorationVerdict, temperatureInTolerance, type RestorationFacts } from '@/lib/records/restoration';
import { restorationSchema } from '@/lib/records/restoration-schema';
import { cToF, fToC } from '@/lib/records/units';

// Hot bituminous material is laid at about 195 °C [practice, no source]; the demo's tolerance ±15 °C is a
// project setting of our own.
const limits = { layingTempTargetC: 195, layingTempToleranceC: 15, compactionPassesDefault: 3, restorationMaxDelayMin: 60 };
const good: RestorationFacts = {
  temperaturesC: [196, 190], laidThicknessMm: 40, requiredThicknessMm: 40, compactionPasses: 3,
  edgesCleanedAt: '2026-11-03T08:00:00Z', surfaceLaidAt: '2026-11-03T08:20:00Z',
};

describe('restorationVerdict', () => {
  it('passes a restoration within every limit', () => {
    expect(restorationVerdict(good, limits)).toEqual({ verdict: 'pass', outOfTolerance: false, late: false, delayMin: 20, reasons: [] });
  });

  it('takes the tolerance\'s ends as within it (180 and 210 °C against 195 ± 15 °C)', () => {
    expect(temperatureInTolerance(180, limits)).toBe(true);
    expect(temperatureInTolerance(210, limits)).toBe(true);
    expect(temperatureInTolerance(179.9, limits)).toBe(false);
    expect(temperatureInTolerance(210.1, limits)).toBe(false);
    expect(restorationVerdict({ ...good, temperaturesC: [180, 210] }, limits).verdict).toBe('pass');
  });

  it('fails on one reading out of tolerance, naming it', () => {
    const v = restorationVerdict({ ...good, temperaturesC: [193, 162] }, limits);
    expect(v.verdict).toBe('fail');
    expect(v.outOfTolerance).toBe(true);
    expect(v.reasons).toEqual([{ severity: 'fail', kind: 'temperature', text: 'Laying temperature 162 °C outside 180–210 °C.' }]);
    expect(restorationVerdict({ ...good, temperaturesC: [226] }, limits).reasons[0].text).toBe('Laying temperature 226 °C outside 180–210 °C.');
  });

  it('warns when no temperature is recorded (nothing shows it was hot enough, nothing shows it was not)', () => {
    const v = restorationVerdict({ ...good, temperaturesC: [] }, limits);
    expect([v.verdict, v.outOfTolerance, v.reasons.map((r) => r.kind)]).toEqual(['warn', false, ['no_temperature']]);
  });

  it('fails a laid thickness below the required one, warns when it is not recorded', () => {
    const thin = restorationVerdict({ ...good, laidThicknessMm: 35 }, limits);
    expect([thin.verdict, thin.reasons[0].text]).toEqual(['fail', 'Laid 35 mm thick, below the required 40 mm.']);
    expect(restorationVerdict({ ...good, laidThicknessMm: 40 }, limits).verdict).toBe('pass');
    expect(restorationVerdict({ ...good, laidThicknessMm: null }, limits).reasons.map((r) => [r.severity, r.kind])).toEqual([['warn', 'no_thickness']]);
  });

  it('warns on fewer compaction passes than the project\'s default', () => {
    const v = restorationVerdict({ ...good, compactionPasses: 2 }, limits);
    expect([v.verdict, v.reasons[0].text]).toEqual(['warn', '2 compaction passes, fewer than the project\'s 3.']);
    expect(restorationVerdict({ ...good, compactionPasses: 4 }, limits).verdict).toBe('pass');
  });

  it('calls laying more than the limit after cleaning late (a warning), exactly the limit on time', () => {
    const onTime = restorationVerdict({ ...good, surfaceLaidAt: '2026-11-03T09:00:00Z' }, limits);
    expect([onTime.verdict, onTime.late, onTime.delayMin]).toEqual(['pass', false, 60]);
    const late = restorationVerdict({ ...good, edgesCleanedAt: '2026-11-04T12:40:00Z', surfaceLaidAt: '2026-11-04T14:50:00Z' }, limits);
    expect([late.verdict, late.late, late.outOfTolerance]).toEqual(['warn', true, false]);
    expect(late.reasons).toEqual([{ severity: 'warn', kind: 'late', text: 'Laid 130 min after the edges were cleaned, more than the project\'s 60 min.' }]);
    // not both times recorded: nothing to say about lateness
    expect(restorationVerdict({ ...good, edgesCleanedAt: null }, limits).late).toBe(false);
    expect(minutesBetween(null, '2026-11-03T08:00:00Z')).toBeNull();
  });

  it('takes the worst: a late, cold restoration fails and is late', () => {
    const v = restorationVerdict({ ...good, temperaturesC: [150], surfaceLaidAt: '2026-11-03T10:00:00Z' }, limits);
    expect([v.verdict, v.outOfTolerance, v.late]).toEqual(['fail', true, true]);
  });

  it('reads 195 °C as 383 °F and back (NIST SP 811: °F = °C × 9/5 + 32)', () => {
    // 195 °C = 383 °F: the trade's check value [practice, no source], by the exact conversion [NIST SP 811]
    expect(cToF(195)).toBe(383);
    expect(fToC(383)).toBe(195);
    // the tolerance's ends: 180 °C = 356 °F, 210 °C = 410 °F [NIST SP 811 conversion]
    expect(cToF(180)).toBe(356);
    expect(cToF(210)).toBe(410);
    expect(temperatureInTolerance(fToC(356), limits)).toBe(true);
  });
});

describe('restorationSchema', () => {
  const base = { routeId: '00000000-0000-4000-8000-000000000001', fromChainageM: 0, toChainageM: 50, restoredAt: '2026-11-03T10:00' };
  const first = (body: unknown) => {
    const r = restorationSchema.safeParse(body);
    expect(r.success).toBe(false);
    const out: Record<string, string> = {};
    for (const i of r.error!.issues) out[i.path.join('.')] ??= i.message;
    return out;
  };
  it('takes a full restoration and rounds millimetres', () => {
    const v = restorationSchema.parse({ ...base, laidThicknessMm: 40.4, requiredThicknessMm: 39.6, temperatures: [{ tempC: 195, measuredAt: '2026-11-03T09:55' }] });
    expect([v.laidThicknessMm, v.requiredThicknessMm]).toEqual([40, 40]);
  });
  it('refuses each bad field with its message', () => {
    expect(first({ ...base, restoredAt: '3.11.2026 10:00' })).toEqual({ restoredAt: 'Give the date and time of the restoration as a date and time (YYYY-MM-DDTHH:mm).' });
    expect(first({ ...base, temperatures: [{ tempC: 500 }] })).toEqual({ 'temperatures.0.tempC': 'A laying temperature must be at most 400 °C.' });
    expect(first({ ...base, temperatures: [{ tempC: 'hot' }] })).toEqual({ 'temperatures.0.tempC': 'A laying temperature must be a number of degrees.' });
    expect(first({ ...base, compactionPasses: 2.5 })).toEqual({ compactionPasses: 'The number of compaction passes must be a whole number of passes.' });
    expect(first({ ...base, laidThicknessMm: 0 })).toEqual({ laidThicknessMm: 'The laid thickness must be at least 1 mm.' });
    expect(first({ ...base, toChainageM: 0 })).toEqual({ toChainageM: 'The stretch must end after it starts (to chainage above from chainage).' });
    expect(first({ ...base, edgesCleanedAt: '2026-11-03T10:00', surfaceLaidAt: '2026-11-03T09:00' })).toEqual({ surfaceLaidAt: 'The surface is laid after the edges are cleaned: check the two times.' });
  });
});
