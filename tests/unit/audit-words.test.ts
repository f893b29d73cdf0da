import { describe, expect, it } from 'vitest';
import { describeAudit, say, words } from '@/components/audit-words';
import { plural, warningWords } from '@/components/ui/upload-words';

describe('the activity log in words', () => {
  it('says which setting changed, from what to what, with units', () => {
    const before = { id: 'p1', name: 'Harrow Lane', lateralToleranceM: 0.5, minCoverDepthM: 0.3, accuracySigmas: {}, updatedAt: 'x' };
    const after = { id: 'p1', name: 'Harrow Lane', lateralToleranceM: 0.75, minCoverDepthM: 0.3, accuracySigmas: { rtk_gnss: 0.03 }, updatedAt: 'y' };
    expect(describeAudit({ objectType: 'project', action: 'update', before, after })).toBe(
      'Changed the lateral tolerance from 0.5 m to 0.75 m; the typical position errors from the usual figures to RTK GNSS 0.03 m.',
    );
  });

  // ---- trench records: record settings and a person's units (lead) ----
  it('says which record setting changed, and a person\'s own units', () => {
    const s = describeAudit({ objectType: 'project', action: 'update', before: { records: { trenchDepthMm: 480, colourSequenceId: 'x' } }, after: { records: { trenchDepthMm: 500, colourSequenceId: 'x' } } });
    expect(s).toContain('trench depth 480 mm');
    expect(s).toContain('trench depth 500 mm');
    expect(s).not.toMatch(/[{}"]/);
    expect(describeAudit({ objectType: 'user', action: 'update', before: { unitSystem: null }, after: { unitSystem: 'imperial' } })).toContain('as each project is set');
  });

  // ---- duct bundles, joints and catalogues (ducts part) ----
  it('tells duct bundles, joints and catalogue edits in sentences', () => {
    const bundle = { routeRef: 'QN-101', fromChainageM: 0, toChainageM: 60, kind: 'installed', ducts: '2 × 7/4 mm', colours: 'blue, orange', tracerWire: true, warningTape: true, protectiveFill: false, note: '' };
    expect(describeAudit({ objectType: 'duct_bundle', action: 'create', before: null, after: bundle })).toBe(
      'Recorded an installed duct bundle on QN-101 from 0 m to 60 m: 2 × 7/4 mm (blue, orange); tracer wire yes, warning tape yes, protective fill no.',
    );
    expect(describeAudit({ objectType: 'duct_bundle', action: 'update', before: bundle, after: { ...bundle, toChainageM: 75, colours: 'orange, blue', protectiveFill: true } })).toBe(
      'Changed the duct bundle on QN-101 from 0 m to 60 m: the end from 60 m to 75 m; the colours from blue, orange to orange, blue; protective fill from no to yes.',
    );
    expect(describeAudit({ objectType: 'duct_bundle', action: 'delete', before: bundle, after: null })).toBe('Removed the installed duct bundle on QN-101 from 0 m to 60 m (2 × 7/4 mm).');
    expect(describeAudit({ objectType: 'duct_bundle', action: 'refresh_planned', before: null, after: { created: 1, removed: 0, kept: 6 } })).toBe('Derived the planned duct bundles from the plan again: 1 new bundle, 0 removed, 6 unchanged.');
    expect(describeAudit({ objectType: 'duct_joint', action: 'create', before: null, after: { routeRef: 'QN-102', chainageM: 64.5, kind: 'connector', ductPositions: [3, 4], note: 'Coupler after a cut duct.' } })).toBe(
      'Recorded a connector on QN-102 at 64.5 m joining ducts 3, 4. Note: Coupler after a cut duct.',
    );
    expect(describeAudit({ objectType: 'duct_joint', action: 'delete', before: { routeRef: 'QN-102', chainageM: 64.5, kind: 'joint', ductPositions: [1] }, after: null })).toBe('Removed a joint on QN-102 at 64.5 m.');
    expect(describeAudit({ objectType: 'duct_size', action: 'create', before: null, after: { size: '8/5.5 mm', common: false, retired: false } })).toBe('Added the duct size 8/5.5 mm to the catalogue.');
    expect(describeAudit({ objectType: 'duct_size', action: 'update', before: { size: '8/5.5 mm', common: false, retired: false }, after: { size: '8/5.5 mm', common: true, retired: true } })).toBe('Duct size 8/5.5 mm: retired it, marked it common.');
    expect(describeAudit({ objectType: 'colour_sequence', action: 'create', before: null, after: { name: 'Site code', standard: '', repeatMarking: 'tracer', colours: ['red', 'green'] } })).toBe('Added the colour sequence Site code: red, green, repeated with a tracer.');
    expect(describeAudit({ objectType: 'utility_kind', action: 'update', before: { label: 'Lighting', retired: false }, after: { label: 'Street lighting', retired: false } })).toBe('Utility kind Street lighting: renamed it from Lighting.');
    expect(describeAudit({ objectType: 'backfill_material', action: 'update', before: { label: 'Glass sand', retired: false }, after: { label: 'Glass sand', retired: true } })).toBe('Backfill material Glass sand: retired it.');
    expect(describeAudit({ objectType: 'backfill_material', action: 'create', before: null, after: { label: 'Glass sand' } })).toBe('Added the backfill material Glass sand to the catalogue.');
  });

  it('tells a change of owner as a proposal and its answer', () => {
    const after = { side: 'owner', from: 'Quillhaven Open Fibre', to: 'Fernbrook Fibre Trust', reason: 'The network was sold.', waitingFor: 'Quillhaven Open Fibre' };
    expect(describeAudit({ objectType: 'org_change', action: 'propose', before: null, after })).toBe(
      'Proposed to change the network owner from Quillhaven Open Fibre to Fernbrook Fibre Trust, waiting for Quillhaven Open Fibre to confirm. Reason: The network was sold.',
    );
    expect(describeAudit({ objectType: 'project', action: 'update', before: { ownerOrganisation: 'A' }, after: { ownerOrganisation: 'B' } })).toBe('Changed the network owner from A to B.');
  });

  it('never shows braces or quotes, even for an entry it has no sentence for', () => {
    const s = describeAudit({ objectType: 'section', action: 'review_reset', before: { review: 'approved' }, after: { review: 'pending', run: 4, ids: ['a', 'b'] } });
    expect(s).toBe('Review reset section: the review from approved to pending; run from nothing to 4; ids from nothing to a, b.');
    expect(s).not.toMatch(/[{}"[\]]/);
    expect(say({ kind: 'distance', from: 0, to: 12.5 })).toBe('kind distance, from 0, to 12.5');
    expect(words('minCoverDepthM')).toBe('minimum cover depth');
    expect(words('plan_version')).toBe('plan version');
  });

  it('tells address register imports, whole and partial', () => {
    expect(describeAudit({ objectType: 'address_import', action: 'import', before: null, after: { fileName: 'register.csv', rows: 1200, added: 3, changed: 2, removed: 1, restored: 1, unchanged: 1194 } })).toBe(
      'Imported the address register from register.csv: 1,200 addresses; 3 added, 2 changed, 1 removed, 1 restored, 1,194 unchanged.',
    );
    expect(describeAudit({ objectType: 'address_import', action: 'import', before: null, after: { fileName: 'new-homes.geojson', partial: true, rows: 1, added: 1, changed: 0, removed: 0, restored: 0, unchanged: 0 } })).toBe(
      'Imported part of the address register (added and updated only) from new-homes.geojson: 1 address; 1 added, 0 changed, 0 removed, 0 restored, 0 unchanged.',
    );
  });

  it('tells drops recorded as installed and taken back', () => {
    expect(describeAudit({ objectType: 'address', action: 'connect', before: { key: 'Q-17', connected: false }, after: { key: 'Q-17', connected: true, connectedOn: '2026-12-03' } })).toBe('Recorded the drop at address Q-17 as installed on 2026-12-03.');
    expect(describeAudit({ objectType: 'address', action: 'disconnect', before: { key: 'Q-17', connected: true }, after: { key: 'Q-17', connected: false } })).toBe('Took back the drop at address Q-17: no longer recorded as installed.');
  });

  it('tells section reviews, one at a time and in bulk', () => {
    expect(describeAudit({ objectType: 'section', action: 'review_approved', before: { review: 'pending' }, after: { review: 'approved', comment: 'Checked on site' } })).toBe('Approved the section. Comment: Checked on site.');
    expect(describeAudit({ objectType: 'section', action: 'review_approved', before: { review: 'pending' }, after: { review: 'approved', bulk: 12 } })).toBe('Approved the section (one of 12 reviewed together).');
    expect(describeAudit({ objectType: 'section', action: 'review_acknowledged', before: { review: 'pending' }, after: { review: 'acknowledged', comment: 'Dropped from the build: the owner moved the cabinet.' } })).toBe(
      'Acknowledged the section as not built. Comment: Dropped from the build: the owner moved the cabinet.',
    );
  });

  it('tells uploads that were stored and refused apart', () => {
    expect(describeAudit({ objectType: 'upload', action: 'create', before: null, after: { fileName: ['a.gpx'], status: 'stored', featureCount: 1, pointCount: 15, crs: 'EPSG:4326' } })).toBe(
      'Uploaded a.gpx: 1 line or point, 15 positions in EPSG:4326.',
    );
    expect(describeAudit({ objectType: 'upload', action: 'create', before: null, after: { fileName: ['b.csv'], status: 'failed', error: 'crs_required' } })).toBe(
      'Uploaded b.csv; it was refused (no coordinate system given) and kept for another try.',
    );
    expect(describeAudit({ objectType: 'reconcile_run', action: 'run', before: null, after: { fixes: 3424, matched: 387, sections: 20, created: 0, retired: 1 } })).toBe(
      'Matched the uploads to the plan: 387 of 3,424 fixes on a planned route; 20 sections (0 new, 1 retired).',
    );
  });
});

describe('counts', () => {
  it('uses the singular for one and the plural otherwise', () => {
    expect([plural(0, 'point'), plural(1, 'point'), plural(2, 'point'), plural(1200, 'point')]).toEqual(['0 points', '1 point', '2 points', '1,200 points']);
    expect(plural(1, 'line or point', 'lines and points')).toBe('1 line or point');
  });
});

describe('parser warnings', () => {
  it("turn the API's wording into words for the form", () => {
    expect(warningWords('attribute mapping guessed from the names present: {"ref":"route_id","street":"street"}; send mapping to set it')).toBe(
      'Attributes recognised from the file\'s field names: route reference from “route_id”, street from “street”. Name the fields above to choose others.',
    );
    expect(warningWords("columns were guessed from the header: id='pt', x='e'; send columns to set them explicitly")).toBe('Columns recognised from the header.');
    expect(warningWords('feature 3 has no geometry; skipped')).toBe('Feature 3 has no geometry; skipped.');
  });

  // ---- road crossings and photos (issue 14) ----
  it('tells road crossings and photos', () => {
    const built = { route: 'QN-X1', built: true, builtOn: '2026-11-03', lengthM: 9.2, sawnBeforeMain: true, ductCount: 1, ductSize: '14/10 mm', addressRef: null, note: '' };
    expect(describeAudit({ objectType: 'road_crossing', action: 'create', before: null, after: built })).toBe('Recorded road crossing QN-X1 as built on 2026-11-03, 9.2 m, sawn before the lengthways cut, 1 × 14/10 mm duct.');
    expect(describeAudit({ objectType: 'road_crossing', action: 'create', before: null, after: { route: 'QN-X3', built: false } })).toBe('Recorded road crossing QN-X3 as not built yet.');
    expect(describeAudit({ objectType: 'road_crossing', action: 'update', before: built, after: { ...built, lengthM: 9.4, note: 'Kerb reset' } })).toBe('Changed road crossing QN-X1: the measured length from 9.2 m to 9.4 m; the note from nothing to Kerb reset.');
    expect(describeAudit({ objectType: 'road_crossing', action: 'delete', before: built, after: null })).toBe('Removed the record of road crossing QN-X1.');
    // the owner's review of handover packages (issue 16)
    expect(describeAudit({ objectType: 'handover', action: 'return', before: { revision: 1, status: 'issued' }, after: { revision: 1, status: 'returned', comments: [{ section: 'QN-101 0–120 m', text: 'Depth missing' }, { section: null, text: 'Add the crossings' }] } }))
      .toBe('Returned handover revision 1 with 2 comments (section QN-101 0–120 m: “Depth missing”; the package: “Add the crossings”).');
    expect(describeAudit({ objectType: 'handover', action: 'accept', before: { revision: 2, status: 'issued' }, after: { revision: 2, status: 'accepted', comments: [] } })).toBe('Accepted handover revision 2.');
    // building them (helper E1)
    expect(describeAudit({ objectType: 'handover', action: 'build', before: null, after: { revision: 3, scope: { routes: ['QN-101', 'QN-102'] }, note: '' } })).toBe('Started building handover revision 3 of routes QN-101, QN-102.');
    expect(describeAudit({ objectType: 'handover', action: 'build', before: null, after: { revision: 1, scope: {}, note: '' } })).toBe('Started building handover revision 1 of every approved section.');
    expect(describeAudit({ objectType: 'handover', action: 'issue', before: { status: 'building' }, after: { revision: 2, status: 'issued', changes: { added: 1, removed: 0, changed: 2 } } })).toBe('Issued handover revision 2 (1 sections added, 0 removed, 2 changed).');
    expect(describeAudit({ objectType: 'handover', action: 'fail', before: { status: 'building' }, after: { revision: 4, status: 'failed', reason: 'The build failed: disk full' } })).toBe('Handover revision 4 failed: The build failed: disk full');
    expect(describeAudit({ objectType: 'handover', action: 'answer', before: null, after: { revision: 1, answers: [{ id: 3, answers: 1, text: 'Re-surveyed' }] } })).toBe('Answered 1 comment of the network owner on handover revision 1.');
    const photo = { fileName: 'IMG_0042.jpg', caption: 'Slot at no. 12', route: 'QN-101', chainageM: 57.3, placedBy: 'exif', crossing: null, pitId: null, takenAt: null, sizeBytes: 1 };
    expect(describeAudit({ objectType: 'photo', action: 'create', before: null, after: photo })).toBe('Added the photo IMG_0042.jpg on QN-101 at 57.3 m, placed from its own GPS position. Caption: Slot at no. 12.');
    expect(describeAudit({ objectType: 'photo', action: 'update', before: photo, after: { ...photo, chainageM: 60, placedBy: 'hand', crossing: 'QN-X1' } })).toBe(
      'Changed the photo IMG_0042.jpg: the place from QN-101 at 57.3 m to QN-101 at 60 m; the road crossing it shows from nothing to road crossing QN-X1.',
    );
    expect(describeAudit({ objectType: 'photo', action: 'delete', before: photo, after: null })).toBe('Removed the photo IMG_0042.jpg (QN-101 at 57.3 m).');
  });

  // ---- surface restoration and daily production (issue 14, restoration part) ----
  it('tells restorations and production corrections', () => {
    const r = { route: 'QN-101', fromChainageM: 140, toChainageM: 280, restoredAt: '2026-11-04 11:30', backfillMaterial: 'Crushed stone 4–8 mm', compactionPasses: 3, requiredThicknessMm: 40, laidThicknessMm: 40, edgesCleanedAt: null, surfaceLaidAt: null, crew: 'North', note: '', temperaturesC: [193], verdict: 'pass' };
    expect(describeAudit({ objectType: 'restoration', action: 'create', before: null, after: r })).toBe('Recorded the restoration of QN-101 140–280 m on 2026-11-04 11:30: pass.');
    expect(describeAudit({ objectType: 'restoration', action: 'update', before: r, after: { ...r, temperaturesC: [193, 162], verdict: 'fail' } })).toBe('Changed the restoration of QN-101 140–280 m: the laying temperatures from 193 °C to 193, 162 °C; now fail.');
    expect(describeAudit({ objectType: 'restoration', action: 'update', before: r, after: r })).toBe('Saved the restoration of QN-101 140–280 m without changes.');
    expect(describeAudit({ objectType: 'restoration', action: 'delete', before: r, after: null })).toBe('Removed the restoration of QN-101 140–280 m.');
    const c = { day: '2026-11-03', crew: 'North', quantity: 'sawn_m', value: 130, reason: 'Site diary.', derived: 140 };
    expect(describeAudit({ objectType: 'production_correction', action: 'create', before: null, after: c })).toBe('Corrected the metres sawn of North on 2026-11-03 from 140 to 130. Reason: Site diary.');
    expect(describeAudit({ objectType: 'production_correction', action: 'create', before: null, after: { ...c, crew: '', quantity: 'pits', value: 2, derived: null } })).toBe('Corrected the pits dug of no crew named on 2026-11-03 from nothing derived to 2. Reason: Site diary.');
    expect(describeAudit({ objectType: 'production_correction', action: 'delete', before: c, after: null })).toBe('Withdrew the correction of the metres sawn of North on 2026-11-03 to 130.');
  });

  // ---- depth readings, test pits and utility crossings (issue 14, depths part) ----
  it('tells depth readings, test pits and utility crossings', () => {
    const d = { routeRef: 'QN-101', chainageM: 40, coverM: 0.42, trenchDepthM: 0.48, measuredAt: null, note: null };
    expect(describeAudit({ objectType: 'depth_reading', action: 'create', before: null, after: d })).toBe('Recorded a depth reading on QN-101 at 40 m: cover 0.42 m, trench depth 0.48 m.');
    expect(describeAudit({ objectType: 'depth_reading', action: 'update', before: d, after: { ...d, coverM: 0.38 } })).toBe('Changed the depth reading on QN-101 at 40 m: the cover from 0.42 m to 0.38 m.');
    expect(describeAudit({ objectType: 'depth_reading', action: 'delete', before: d, after: null })).toBe('Removed the depth reading on QN-101 at 40 m (cover 0.42 m).');
    expect(describeAudit({ objectType: 'depth_reading', action: 'import', before: null, after: { fileName: 'depths.csv', count: 14, belowMinimum: 2 } })).toBe('Imported 14 depth readings from depths.csv, 2 below the minimum cover.');
    expect(describeAudit({ objectType: 'depth_reading', action: 'import_upload', before: null, after: { fileName: 'shots.shp', attribute: 'depth', count: 1 } })).toBe('Took 1 depth reading from the depth attribute of the upload shots.shp.');
    const p = { name: 'TP-1', routeRef: 'QN-102', chainageM: 30, dugOn: '2026-11-02', method: 'vacuum', depthM: 0.9, findings: null };
    expect(describeAudit({ objectType: 'test_pit', action: 'create', before: null, after: p })).toBe('Recorded test pit TP-1 on QN-102 at 30 m, dug by vacuum excavation on 2026-11-02, 0.9 m deep.');
    expect(describeAudit({ objectType: 'test_pit', action: 'update', before: p, after: { ...p, method: 'hand_dug' } })).toBe('Changed test pit TP-1 on QN-102 at 30 m: how it was dug from by vacuum excavation to by hand.');
    expect(describeAudit({ objectType: 'test_pit', action: 'import_upload', before: null, after: { fileName: 'pits.gpx', code: 'PIT', count: 2 } })).toBe('Took 2 test pits from the points marked PIT in the upload pits.gpx.');
    const u = { utility: 'Gas', owner: 'Fen Gas', routeRef: 'QN-101', chainageM: 90, depthM: 0.6, clearanceM: 0.12, method: 'gpr', foundOn: null, pit: null, note: null };
    expect(describeAudit({ objectType: 'utility_crossing', action: 'create', before: null, after: u })).toBe('Recorded a gas utility of Fen Gas on QN-101 at 90 m, found by ground-penetrating radar: depth 0.6 m, clearance 0.12 m.');
    expect(describeAudit({ objectType: 'utility_crossing', action: 'update', before: u, after: { ...u, clearanceM: 0.32 } })).toBe('Changed the gas utility on QN-101 at 90 m: the clearance from 0.12 m to 0.32 m.');
    expect(describeAudit({ objectType: 'utility_crossing', action: 'delete', before: u, after: null })).toBe('Removed the gas utility on QN-101 at 90 m.');
  });
});
