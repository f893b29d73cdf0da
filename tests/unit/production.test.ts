import { describe, expect, it } from 'vitest';
import { aggregateProduction, dailyTotals, dayOnClock, productionCorrectionSchema, productionRangeSchema, type ProductionCorrection, type ProductionFact } from '@/lib/records/production';

const facts: ProductionFact[] = [
  { day: '2026-11-03', crew: 'North', quantity: 'laid_m', value: 120.25 },
  { day: '2026-11-03', crew: 'North', quantity: 'laid_m', value: 19.756 },
  { day: '2026-11-03', crew: 'North', quantity: 'sawn_m', value: 140 },
  { day: '2026-11-03', crew: '', quantity: 'crossings', value: 1 },
  { day: '2026-11-03', crew: '', quantity: 'crossings', value: 1 },
  { day: '2026-11-04', crew: 'North', quantity: 'restored_m', value: 70 },
  { day: '2026-11-04', crew: 'South', quantity: 'pits', value: 1 },
];
const correction = (over: Partial<ProductionCorrection>): ProductionCorrection => ({
  id: 'c1', day: '2026-11-03', crew: 'North', quantity: 'sawn_m', value: 130, reason: 'Site diary', createdAt: '2026-11-05T10:00:00Z', createdByName: 'Eng', ...over,
});

describe('aggregateProduction', () => {
  it('sums the facts per day and crew, newest day first, and leaves what no record gives null', () => {
    const days = aggregateProduction(facts, []);
    expect(days.map((d) => [d.day, d.crew])).toEqual([['2026-11-04', 'North'], ['2026-11-04', 'South'], ['2026-11-03', ''], ['2026-11-03', 'North']]);
    const north3 = days.find((d) => d.day === '2026-11-03' && d.crew === 'North')!;
    expect(north3.figures.laid_m).toEqual({ derived: 140.01, shown: 140.01, correction: null });
    expect(north3.figures.restored_m).toEqual({ derived: null, shown: null, correction: null });
    expect(days.find((d) => d.crew === '')!.figures.crossings.shown).toBe(2);
  });

  it('shows the newest correction in place of the derived figure, keeping the derived one and the reason', () => {
    const older = correction({ id: 'old', value: 100, reason: 'First guess', createdAt: '2026-11-05T09:00:00Z' });
    const newer = correction({ id: 'new', value: 130, reason: 'Site diary', createdAt: '2026-11-05T10:00:00Z' });
    const f = aggregateProduction(facts, [newer, older]).find((d) => d.day === '2026-11-03' && d.crew === 'North')!.figures.sawn_m;
    expect([f.derived, f.shown, f.correction?.id, f.correction?.reason]).toEqual([140, 130, 'new', 'Site diary']);
  });

  it('makes a row for a correction of a day and crew no record names', () => {
    const days = aggregateProduction(facts, [correction({ day: '2026-11-02', crew: 'West', quantity: 'pits', value: 3 })]);
    const west = days.find((d) => d.crew === 'West')!;
    expect([west.day, west.figures.pits.derived, west.figures.pits.shown]).toEqual(['2026-11-02', null, 3]);
  });

  it('keeps the days within from–to, both ends included', () => {
    expect(aggregateProduction(facts, [], { from: '2026-11-04' }).map((d) => d.day)).toEqual(['2026-11-04', '2026-11-04']);
    expect(aggregateProduction(facts, [correction({})], { to: '2026-11-03' }).every((d) => d.day === '2026-11-03')).toBe(true);
    expect(aggregateProduction(facts, [], { from: '2026-11-05', to: '2026-11-09' })).toEqual([]);
  });

  it('totals the shown figures per day for the chart, oldest first', () => {
    const totals = dailyTotals(aggregateProduction(facts, [correction({})]));
    expect(totals).toEqual([
      { day: '2026-11-03', sawn_m: 130, laid_m: 140.01, backfilled_m: 0, restored_m: 0, crossings: 2, pits: 0 },
      { day: '2026-11-04', sawn_m: 0, laid_m: 0, backfilled_m: 0, restored_m: 70, crossings: 0, pits: 1 },
    ]);
  });
});

describe('dayOnClock', () => {
  it('takes the day on the project\'s clock, not UTC\'s', () => {
    // 23:30 UTC is 00:30 the next day in Berlin (CET, UTC+1 in November) [IANA tz database]
    expect(dayOnClock('2026-11-03T23:30:00Z', 'Europe/Berlin')).toBe('2026-11-04');
    expect(dayOnClock('2026-11-03T23:30:00Z', 'UTC')).toBe('2026-11-03');
    expect(dayOnClock('2026-11-04T03:00:00Z', 'America/New_York')).toBe('2026-11-03');
  });
});

describe('productionCorrectionSchema', () => {
  const first = (body: unknown) => {
    const r = productionCorrectionSchema.safeParse(body);
    expect(r.success).toBe(false);
    const out: Record<string, string> = {};
    for (const i of r.error!.issues) out[i.path.join('.')] ??= i.message;
    return out;
  };
  const base = { day: '2026-11-03', crew: 'North', quantity: 'laid_m', value: 120, reason: 'Diary' };
  it('needs a reason, a known quantity, a plausible figure and day', () => {
    expect(productionCorrectionSchema.parse({ ...base, crew: undefined }).crew).toBe('');
    expect(first({ ...base, reason: '  ' })).toEqual({ reason: 'Say why the figure is corrected.' });
    expect(first({ ...base, reason: undefined })).toEqual({ reason: 'Say why the figure is corrected.' });
    expect(first({ ...base, quantity: 'dug_m' })).toEqual({ quantity: 'Pick what is corrected: sawn, laid, backfilled or restored metres, crossings or pits.' });
    expect(first({ ...base, value: -1 })).toEqual({ value: 'The corrected figure cannot be negative.' });
    expect(first({ ...base, quantity: 'pits', value: 1.5 })).toEqual({ value: 'Crossings and pits are counted: give a whole number.' });
    expect(first({ ...base, day: '2099-01-01' })).toEqual({ day: 'The day cannot be in the future.' });
    expect(first({ ...base, day: '03.11.2026' })).toEqual({ day: 'Give the day as YYYY-MM-DD.' });
  });
  it('checks the range of the list', () => {
    expect(productionRangeSchema.safeParse({ from: '2026-11-05', to: '2026-11-03' }).error!.issues[0].message).toBe('"to" must not be before "from".');
    expect(productionRangeSchema.parse({})).toEqual({});
  });
});
