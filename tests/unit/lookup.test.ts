import { describe, expect, it } from 'vitest';
import { addressScore, parseAddressQuery } from '@/lib/households/address-query';
import { couldBeThisClose, relativeSide, sideOf, sortStretches } from '@/lib/lookup/stretches';

describe('parseAddressQuery', () => {
  it('splits street, number with suffix, postcode and locality', () => {
    expect(parseAddressQuery('Mill Str. 12a, 40210 Quillhaven')).toEqual({ street: 'mill street', number: { base: 12, suffix: 'a' }, postcode: '40210', locality: 'quillhaven' });
    expect(parseAddressQuery('12 B Lanternfield Rd')).toEqual({ street: 'lanternfield road', number: { base: 12, suffix: 'b' }, postcode: null, locality: '' });
    expect(parseAddressQuery('Cobbler Walk 7 40210')).toMatchObject({ street: 'cobbler walk', number: { base: 7, suffix: '' }, postcode: '40210' });
    expect(parseAddressQuery('Wickham Rise')).toMatchObject({ street: 'wickham rise', number: null, postcode: null });
    // UK shape after a comma [practice]
    expect(parseAddressQuery('3 Saltmarsh Row, QH1 4AB')).toMatchObject({ number: { base: 3, suffix: '' }, postcode: 'qh14ab' });
  });
  it('scores the exact number over the same base over a nearer number, and a matching postcode higher', () => {
    const q = parseAddressQuery('Mill Street 12a, 40210');
    const exact = addressScore(0.8, q, { numberBase: 12, numberSuffix: 'a', postcode: '40210' });
    const base = addressScore(0.8, q, { numberBase: 12, numberSuffix: '', postcode: '40210' });
    const near = addressScore(0.8, q, { numberBase: 13, numberSuffix: '', postcode: '40210' });
    const far = addressScore(0.8, q, { numberBase: 40, numberSuffix: '', postcode: '40210' });
    const otherPostcode = addressScore(0.8, q, { numberBase: 12, numberSuffix: 'a', postcode: '40299' });
    expect(exact).toBeGreaterThan(base);
    expect(base).toBeGreaterThan(near);
    expect(near).toBeGreaterThan(far);
    expect(exact).toBeGreaterThan(otherPostcode);
  });
});

describe('lookup stretches', () => {
  it('reads the side from the signed offset (left of the direction positive)', () => {
    expect(sideOf(3.2)).toBe('left');
    expect(sideOf(-0.4)).toBe('right');
    expect(sideOf(0.001)).toBe('on');
    expect(relativeSide('left', 'left')).toBe('same side as the address');
    expect(relativeSide('right', 'left')).toBe('across');
    expect(relativeSide('left', null)).toBeNull();
  });
  it('"could be this close" is the distance less the 95 % radius, never below 0', () => {
    expect(couldBeThisClose(12, 9.79)).toBeCloseTo(2.21, 10);
    expect(couldBeThisClose(3, 9.79)).toBe(0);
    expect(couldBeThisClose(7, null)).toBe(7);
  });
  it('sorts by distance or by "could be this close", stable on ties', () => {
    const list = [
      { id: 'a', distanceM: 7, radiusM: 0.05 },
      { id: 'b', distanceM: 12, radiusM: 10 },
      { id: 'c', distanceM: 7, radiusM: 0.05 },
    ];
    expect(sortStretches(list).map((s) => s.id)).toEqual(['a', 'c', 'b']);
    expect(sortStretches(list, 'could_be').map((s) => s.id)).toEqual(['b', 'a', 'c']);
  });
});
