import { readFileSync } from 'node:fs';
import path from 'node:path';
import { beforeEach, describe, expect, it, vi } from 'vitest';
import { decodeText, IngestError, readZip, type ParsedLine, type ParsedUpload } from '@/lib/ingest';
import { KML_STREAM_THRESHOLD, parseKml, parseKmlDom } from '@/lib/ingest/parse-kml';
import { parseKmlStream } from '@/lib/ingest/parse-kml-stream';
import { ingestError } from '../../helpers/ingest-errors';

// the real streaming parser, wrapped so that the tests can see which path parseKml took
vi.mock('@/lib/ingest/parse-kml-stream', async (importOriginal) => {
  const mod = await importOriginal<typeof import('@/lib/ingest/parse-kml-stream')>();
  return { ...mod, parseKmlStream: vi.fn(mod.parseKmlStream) };
});

const IN = path.join(__dirname, '../../fixtures/ingest/in');
const fixture = (name: string) => decodeText(readFileSync(path.join(IN, name)));
const limits = { maxInflatedBytes: 20 * 1024 * 1024, maxZipEntries: 1000 };


/** Every place where two values differ; numbers may differ by less than 1e-12. */
function differences(a: unknown, b: unknown, at = '$', out: string[] = []): string[] {
  if (typeof a === 'number' && typeof b === 'number') {
    if (!(Object.is(a, b) || Math.abs(a - b) < 1e-12)) out.push(`${at}: ${a} != ${b}`);
  } else if (Array.isArray(a) && Array.isArray(b)) {
    if (a.length !== b.length) out.push(`${at}: length ${a.length} != ${b.length}`);
    else a.forEach((v, i) => differences(v, b[i], `${at}[${i}]`, out));
  } else if (a && b && typeof a === 'object' && typeof b === 'object' && !Array.isArray(a) && !Array.isArray(b)) {
    const keys = new Set([...Object.keys(a), ...Object.keys(b)]);
    for (const k of keys) {
      if (!(k in a) || !(k in b)) out.push(`${at}.${k}: present on one side only`);
      else differences((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k], `${at}.${k}`, out);
    }
  } else if (a !== b) {
    out.push(`${at}: ${JSON.stringify(a)} != ${JSON.stringify(b)}`);
  }
  return out.slice(0, 20);
}

/** The togeojson path is the oracle: the streaming parser must give the same upload (features, warnings, format). */
function expectSameAsOracle(text: string, format: 'kml' | 'kmz' = 'kml'): ParsedUpload {
  const oracle = parseKmlDom(text, format);
  const streamed = parseKmlStream(text, format);
  expect(differences(streamed, oracle)).toEqual([]);
  return streamed;
}

/** Same error code (and for out_of_range the same list of offending elements) through both paths. */
function expectSameError(text: string): [IngestError, IngestError] {
  const dom = ingestError(() => parseKmlDom(text));
  const stream = ingestError(() => parseKmlStream(text));
  expect(stream.code).toBe(dom.code);
  if (dom.code === 'out_of_range') expect(stream.details).toEqual(dom.details);
  return [dom, stream];
}

const KML = (body: string) =>
  `<?xml version="1.0" encoding="UTF-8"?>\n<kml xmlns="http://www.opengis.net/kml/2.2" xmlns:gx="http://www.google.com/kml/ext/2.2"><Document>${body}</Document></kml>`;

/** A small deterministic PRNG, so the generated files are the same on every run. */
function prng(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s / 2 ** 32;
  };
}

/** ~4,000 coordinates: LineStrings, Points, a MultiGeometry, a gx:Track, ExtendedData, nested folders. */
function generatedKml(): { text: string; coords: number } {
  const rnd = prng(42);
  const lon = () => (13 + rnd() * 0.1).toFixed(7);
  const lat = () => (52 + rnd() * 0.1).toFixed(7);
  const alt = () => (30 + rnd() * 10).toFixed(2);
  const seps = [' ', '\n', '\t', '  \n '];
  const tuples = (n: number, withAlt: boolean) =>
    Array.from({ length: n }, (_, i) => `${lon()},${lat()}${withAlt ? `,${alt()}` : ''}${seps[i % seps.length]}`).join('');
  const parts: string[] = [];
  let coords = 0;
  for (let f = 0; f < 6; f++) {
    parts.push(`<Folder><name>Section ${f}</name>`);
    for (let p = 0; p < 10; p++) {
      const n = 20 + Math.floor(rnd() * 60);
      coords += n;
      parts.push(
        `<Placemark id="l${f}-${p}"><name>Duct ${f}.${p}</name><styleUrl>#red</styleUrl>` +
          `<ExtendedData><Data name="ducts"><value>${p % 4}</value></Data><Data name="contractor"><value>Acme &amp; Söhne</value></Data></ExtendedData>` +
          `<LineString><tessellate>1</tessellate><coordinates>\n ${tuples(n, p % 2 === 0)}\n</coordinates></LineString></Placemark>`,
      );
    }
    parts.push(`<Folder><name>Manholes</name>`);
    for (let p = 0; p < 15; p++) {
      coords++;
      parts.push(
        `<Placemark><name>MH ${f}.${p}</name><description><![CDATA[<b>Shaft</b> ${p}]]></description>` +
          `<ExtendedData><SchemaData schemaUrl="#mh"><SimpleData name="depth">${(1 + rnd()).toFixed(2)}</SimpleData><SimpleData name="kind">${p % 2 ? 'round' : 'square'}</SimpleData></SchemaData></ExtendedData>` +
          `<Point><coordinates>${lon()},${lat()},${alt()}</coordinates></Point></Placemark>`,
      );
    }
    parts.push('</Folder></Folder>');
  }
  coords += 3 * 40 + 1;
  parts.push(
    `<Placemark><name>Crossing</name><TimeStamp><when>2024-05-14T09:00:00+02:00</when></TimeStamp><MultiGeometry>` +
      `<LineString><coordinates>${tuples(40, true)}</coordinates></LineString>` +
      `<MultiGeometry><LineString><coordinates>${tuples(40, false)}</coordinates></LineString><Point><coordinates>${lon()},${lat()}</coordinates></Point></MultiGeometry>` +
      `<Polygon><outerBoundaryIs><LinearRing><coordinates>13,52 13.1,52 13.1,52.1 13,52</coordinates></LinearRing></outerBoundaryIs></Polygon>` +
      `<LineString><coordinates>${tuples(40, true)}</coordinates></LineString>` +
      `</MultiGeometry></Placemark>`,
  );
  const n = 500;
  coords += n;
  const whens = Array.from({ length: n }, (_, i) => `<when>2024-05-14T07:${String(Math.floor(i / 60)).padStart(2, '0')}:${String(i % 60).padStart(2, '0')}Z</when>`);
  const gx = Array.from({ length: n }, () => `<gx:coord>${lon()} ${lat()} ${alt()}</gx:coord>`);
  parts.push(`<Placemark><name>Walk</name><ExtendedData><Data name="device"><value>GNSS 7</value></Data></ExtendedData><gx:Track><altitudeMode>absolute</altitudeMode>${whens.join('\n')}\n${gx.join('\n')}</gx:Track></Placemark>`);
  parts.push(`<Placemark><name>Area</name><Polygon><outerBoundaryIs><LinearRing><coordinates>13,52 13.1,52 13.1,52.1 13,52</coordinates></LinearRing></outerBoundaryIs></Polygon></Placemark>`);
  const schema = `<Schema name="mh" id="mh"><SimpleField name="depth" type="float"/><SimpleField name="kind" type="string"/></Schema>`;
  const style = `<Style id="red"><LineStyle><color>ff0000ff</color><width>3</width></LineStyle></Style>`;
  return { text: KML(`<name>Generated</name>${style}${schema}${parts.join('\n')}`), coords };
}

/** Above the threshold: 100,000 coordinates in 100 LineStrings of 1,000. */
function bigKml(): string {
  const lines: string[] = [];
  for (let l = 0; l < 100; l++) {
    const c: string[] = [];
    for (let i = 0; i < 1000; i++) {
      const k = l * 1000 + i;
      c.push(`${(13 + k * 1e-6).toFixed(7)},${(52 + k * 1e-6).toFixed(7)},${(30 + (k % 100) / 10).toFixed(1)}`);
    }
    lines.push(`<Placemark><name>Line ${l + 1}</name><ExtendedData><Data name="run"><value>${l + 1}</value></Data></ExtendedData><LineString><coordinates>${c.join(' ')}</coordinates></LineString></Placemark>`);
  }
  return KML(lines.join('\n'));
}

beforeEach(() => {
  vi.mocked(parseKmlStream).mockClear();
});

describe('parseKmlStream agrees with the togeojson path (the oracle)', () => {
  it.each(['kml-mixed.kml', 'kml-gdal.kml'])('reads %s to the same features and warnings', (name) => {
    const u = expectSameAsOracle(fixture(name));
    expect(u.features.length).toBeGreaterThan(0);
  });

  it('reads the doc.kml inside kmz-doc.kmz to the same features', async () => {
    const [entry] = await readZip(readFileSync(path.join(IN, 'kmz-doc.kmz')), limits, (n) => n === 'doc.kml');
    const u = expectSameAsOracle(decodeText(entry.bytes), 'kmz');
    expect([u.format, u.features.length]).toEqual(['kmz', 6]);
  });

  it('gives the same error codes for the bad fixtures', () => {
    const [, lat] = expectSameError(fixture('kml-lat95.kml'));
    expect(lat.code).toBe('out_of_range');
    expect((lat.details as { problems: { where: string }[] }).problems.map((p) => p.where)).toEqual(["placemark 1 'Bad' position 2", "placemark 1 'Bad' position 3"]);

    const [, bad] = expectSameError(fixture('kml-malformed.kml'));
    expect(bad.code).toBe('malformed');
    // saxes reports where it noticed the mismatch: the end of </Pont>
    expect(bad.details).toEqual({ line: 3, column: 50 });
    expect(bad.message).toBe('the KML is not well-formed XML at line 3, column 50: unexpected close tag.');

    const [, entity] = expectSameError(fixture('kml-entity-utf16le.kml'));
    expect(entity.code).toBe('unsafe_xml');
  });

  it('agrees on a generated file of ~4,000 coordinates across many placemarks', () => {
    const { text, coords } = generatedKml();
    expect(coords).toBeGreaterThanOrEqual(3000);
    expect(coords).toBeLessThanOrEqual(5000);
    const u = expectSameAsOracle(text);
    const read = u.features.reduce((n, f) => n + (f.kind === 'line' ? f.coords.length : 1), 0);
    expect(read).toBe(coords);
    const walk = u.features.find((f) => f.name === 'Walk') as ParsedLine;
    expect([walk.coords.length, walk.times?.length, walk.times?.[61], walk.attributes]).toEqual([500, 500, '2024-05-14T07:01:01.000Z', { device: 'GNSS 7' }]);
    expect(u.features.filter((f) => f.name === 'Crossing').map((f) => [f.kind, f.attributes.part])).toEqual([['line', 1], ['line', 2], ['point', 3], ['line', 5]]);
    expect(u.warnings).toEqual([
      "placemark 151 'Crossing' part 4 is a Polygon; only lines and points are read, so it was skipped",
      "placemark 153 'Area' is a Polygon; only lines and points are read, so it was skipped",
    ]);
  });

  it.each<[string, string]>([
    ['whitespace inside and around tuples', `<Placemark><LineString><coordinates>\r\n\t13.4,52.5,1\n13.5, 52.6 13.6,52.7,x,4  13.7,52.8,Infinity </coordinates></LineString></Placemark>`],
    ['a LineString of one position, and a Placemark without geometry', `<Placemark><name>One</name><LineString><coordinates>13.4,52.5</coordinates></LineString></Placemark><Placemark/>`],
    ['geometry that is not a direct child, a LinearRing that is', `<Placemark><Foo><Point><coordinates>1,2</coordinates></Point></Foo></Placemark><Placemark><LinearRing><coordinates>1,2 3,4 5,6 1,2</coordinates></LinearRing></Placemark>`],
    ['a degenerate polygon (dropped silently by togeojson)', `<Placemark><name>P</name><Polygon><outerBoundaryIs><LinearRing><coordinates>1,2 1,2</coordinates></LinearRing></outerBoundaryIs></Polygon></Placemark>`],
    ['a polygon whose only usable ring is an inner one', `<Placemark><Polygon><outerBoundaryIs><LinearRing/></outerBoundaryIs><innerBoundaryIs><LinearRing><coordinates>1,2 3,4 5,6</coordinates></LinearRing></innerBoundaryIs></Polygon></Placemark>`],
    ['a single-position track with a TimeStamp', `<Placemark><TimeStamp><when>2024-02-02</when></TimeStamp><gx:Track><gx:coord>1 2 3</gx:coord></gx:Track></Placemark>`],
    ['a track with fewer <when> than <gx:coord>', `<Placemark><gx:Track><when>2024-01-01T00:00:00Z</when><gx:coord>1 2 3</gx:coord><gx:coord>1 3</gx:coord></gx:Track></Placemark>`],
    ['a track beside a LineString (times dropped)', `<Placemark><MultiGeometry><gx:Track><when>2024-01-01T00:00:00Z</when><when>2024-01-01T00:00:01Z</when><gx:coord>1 2</gx:coord><gx:coord>1 3</gx:coord></gx:Track><LineString><coordinates>1,2 3,4</coordinates></LineString></MultiGeometry></Placemark>`],
    ['a gx:MultiTrack of two timed tracks', `<Placemark><gx:MultiTrack><gx:Track><when>2024-01-01T00:00:00Z</when><when>2024-01-01T00:00:01Z</when><gx:coord>1 2 3</gx:coord><gx:coord>1 3</gx:coord></gx:Track><gx:Track><when>2024-01-01T00:00:02+01:00</when><when>bogus</when><gx:coord>1 2</gx:coord><gx:coord>1 3 x</gx:coord></gx:Track></gx:MultiTrack></Placemark>`],
    ['ExtendedData overriding name, typed SimpleData, schema after use', `<Placemark><name>E</name><address>Main 1</address><ExtendedData><Data name="a"><displayName>A</displayName><value> 1 </value></Data><Data name="b"/><Data name="name"><value>Renamed</value></Data><SchemaData><SimpleData name="n">4.5</SimpleData><SimpleData name="flag">0</SimpleData><SimpleData name="stroke">red</SimpleData></SchemaData></ExtendedData><Point><coordinates>1,2</coordinates></Point></Placemark><Schema id="s"><SimpleField name="n" type="double"/><SimpleField name="flag" type="bool"/></Schema>`],
    ['descriptions as text, HTML (CDATA) and nested markup', `<Placemark><description>a &amp; b</description><Point><coordinates>1,2</coordinates></Point></Placemark><Placemark><description>x<![CDATA[<b>y</b>]]></description><Point><coordinates>1,2</coordinates></Point></Placemark><Placemark><description><![CDATA[]]>z<p>q<!-- c --></p></description><Point><coordinates>1,2</coordinates></Point></Placemark>`],
    ['TimeSpan and TimeStamp', `<Placemark><TimeSpan><begin>2024</begin></TimeSpan><TimeStamp><when>2024-05-01T10:00:00</when></TimeStamp><Point><coordinates>1,2</coordinates></Point></Placemark>`],
    ['ground overlays and network links (listed after the placemarks)', `<GroundOverlay><name>img</name><LatLonBox><north>1</north><south>0</south><east>1</east><west>0</west></LatLonBox></GroundOverlay><GroundOverlay><name>none</name></GroundOverlay><Placemark><name>after</name><Point><coordinates>1,2</coordinates></Point></Placemark><NetworkLink><name>nl</name><Region><LatLonAltBox><north>1</north><south>0</south><east>1</east><west>0</west></LatLonAltBox></Region></NetworkLink>`],
    ['entities, CDATA and comments in names and coordinates', `<Placemark><name>a &lt;b&gt; &#252;<!-- c --></name><LineString><coordinates><![CDATA[1,2 3,4]]> <!-- x --> 5,6</coordinates></LineString></Placemark>`],
    ['a prefixed kml:Placemark (not read by togeojson)', `<kml:Placemark xmlns:kml="http://www.opengis.net/kml/2.2"><kml:Point><kml:coordinates>1,2</kml:coordinates></kml:Point></kml:Placemark>`],
  ])('agrees on %s', (_, body) => {
    expectSameAsOracle(KML(body));
  });

  it.each<[string, string]>([
    ['out-of-range positions in several placemarks and parts', KML(`<Placemark><name>a</name><Point><coordinates>200,2</coordinates></Point></Placemark><Placemark><MultiGeometry><LineString><coordinates>1,2 1,91</coordinates></LineString><Point><coordinates>1,-91</coordinates></Point></MultiGeometry></Placemark>`)],
    ['gx:coord with stray spaces (togeojson splits on single spaces)', KML(`<Placemark><gx:Track><gx:coord> 1 2 3</gx:coord><gx:coord>1  2</gx:coord><gx:coord>7</gx:coord></gx:Track></Placemark>`)],
    ['a root other than <kml>', `<gpx><Placemark><Point><coordinates>1,2</coordinates></Point></Placemark></gpx>`],
    ['an undeclared gx: prefix', `<kml><Placemark><gx:Track><gx:coord>1 2</gx:coord></gx:Track></Placemark></kml>`],
    ['a truncated file', KML(`<Placemark><name>a</name><Point><coordinates>1,2</coordinates></Point></Placemark>`).slice(0, -40)],
    ['an unclosed attribute quote', `<kml a="1><Placemark/></kml>`],
    ['an empty file', ''],
  ])('gives the same error for %s', (_, text) => {
    const [dom, stream] = expectSameError(text);
    if (dom.code === 'malformed' && dom.details) expect(stream.details).toEqual({ line: expect.any(Number), column: expect.any(Number) });
  });
});

describe('parseKml dispatch', () => {
  it('keeps the togeojson path up to KML_STREAM_THRESHOLD characters', () => {
    const text = fixture('kml-mixed.kml');
    expect(parseKml(text)).toEqual(parseKmlDom(text));
    expect(parseKmlStream).not.toHaveBeenCalled();
  });

  it('streams a file above the threshold: 100,000 coordinates', () => {
    const text = bigKml();
    expect(text.length).toBeGreaterThan(KML_STREAM_THRESHOLD);
    const u = parseKml(text, 'kmz');
    expect(parseKmlStream).toHaveBeenCalledTimes(1);
    const lines = u.features as ParsedLine[];
    expect([u.format, u.sourceCrs, u.warnings, lines.length]).toEqual(['kmz', 'EPSG:4326', [], 100]);
    expect(lines.every((f) => f.kind === 'line' && f.coords.length === 1000 && f.times === null)).toBe(true);
    expect(lines.reduce((n, f) => n + f.coords.length, 0)).toBe(100_000);
    expect([lines[0].name, lines[0].attributes, lines[0].coords[0]]).toEqual(['Line 1', { run: '1' }, [13, 52, 30]]);
    expect([lines[99].name, lines[99].coords[999]]).toEqual(['Line 100', [13.099999, 52.099999, 39.9]]);
  });

  it('reports malformed XML in a large file with line and column from saxes', () => {
    // the header takes line 1, so placemark 'Line 51' is on line 52
    const text = bigKml().replace('</Placemark>\n<Placemark><name>Line 51<', '</Placemark>\n<Placemark><name>Line 51</nam><');
    const e = ingestError(() => parseKml(text));
    expect(parseKmlStream).toHaveBeenCalledTimes(1);
    expect(e.code).toBe('malformed');
    expect(e.details).toEqual({ line: 52, column: expect.any(Number) });
    expect(e.message).toMatch(/^the KML is not well-formed XML at line 52, column \d+: /);
  });
});
