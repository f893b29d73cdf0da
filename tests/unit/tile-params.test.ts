import { describe, expect, it } from 'vitest';
import { TILE_LAYERS, etagMatches, parseTileParams, simplifyTolerance } from '@/lib/tiles/params';

describe('tile address', () => {
  it('reads {layer}/{z}/{x}/{y}.mvt; all is every layer in the catalogue order', () => {
    expect(parseTileParams({ layer: 'sections', z: '14', x: '8656', y: '5460.mvt' })).toEqual({ ok: true, tile: { layers: ['sections'], z: 14, x: 8656, y: 5460 } });
    const all = parseTileParams({ layer: 'all', z: '0', x: '0', y: '0.mvt' });
    expect(all.ok && all.tile.layers).toEqual([...TILE_LAYERS]);
  });
  it('takes x and y up to 2^z−1 and z up to 22', () => {
    expect(parseTileParams({ layer: 'photos', z: '22', x: String(2 ** 22 - 1), y: `${2 ** 22 - 1}.mvt` }).ok).toBe(true);
    expect(parseTileParams({ layer: 'photos', z: '3', x: '8', y: '0.mvt' })).toMatchObject({ ok: false, param: 'x' });
    expect(parseTileParams({ layer: 'photos', z: '3', x: '0', y: '8.mvt' })).toMatchObject({ ok: false, param: 'y' });
    expect(parseTileParams({ layer: 'photos', z: '23', x: '0', y: '0.mvt' })).toMatchObject({ ok: false, param: 'z' });
  });
  it('refuses leading zeros, signs, decimals, other suffixes and unknown layers', () => {
    for (const [p, param] of [
      [{ layer: 'photos', z: '03', x: '0', y: '0.mvt' }, 'z'],
      [{ layer: 'photos', z: '+3', x: '0', y: '0.mvt' }, 'z'],
      [{ layer: 'photos', z: '3', x: '1e0', y: '0.mvt' }, 'x'],
      [{ layer: 'photos', z: '3', x: '0', y: '0.pbf' }, 'y'],
      [{ layer: 'photos', z: '3', x: '0', y: '.mvt' }, 'y'],
      [{ layer: 'Photos', z: '3', x: '0', y: '0.mvt' }, 'layer'],
      [{ z: '3', x: '0', y: '0.mvt' }, 'layer'],
    ] as const) {
      expect(parseTileParams(p)).toMatchObject({ ok: false, param });
    }
  });
});

describe('simplification tolerance', () => {
  it('is one tile unit of Web Mercator below zoom 16 and nothing from there on', () => {
    // the world is 2π·6378137 m = 40,075,016.69 m wide in EPSG:3857; at zoom 0 a unit is that over 4096
    expect(simplifyTolerance(0)).toBeCloseTo(40075016.6856 / 4096, 3);
    expect(simplifyTolerance(15)).toBeCloseTo(40075016.6856 / 2 ** 15 / 4096, 9);
    expect(simplifyTolerance(16)).toBe(0);
  });
});

describe('If-None-Match', () => {
  it('matches the ETag itself, in a list, weak, or *', () => {
    expect(etagMatches('"abc"', '"abc"')).toBe(true);
    expect(etagMatches('"x", W/"abc"', '"abc"')).toBe(true);
    expect(etagMatches('*', '"abc"')).toBe(true);
    expect(etagMatches('"abcd"', '"abc"')).toBe(false);
    expect(etagMatches(null, '"abc"')).toBe(false);
  });
});
