// The activity log in sentences a person reads, not the JSON the audit table stores.

import { ACCURACY_CLASS_LABELS, type AccuracyClass } from '@/lib/records/accuracy-classes';
import { plural } from '@/components/ui/upload-words';

export interface AuditLike {
  objectType: string;
  action: string;
  before: unknown;
  after: unknown;
}

type Obj = Record<string, unknown>;
const isObj = (v: unknown): v is Obj => typeof v === 'object' && v !== null && !Array.isArray(v);

const deg = (v: unknown) => (typeof v === 'number' ? String(Number(v.toFixed(5))) : say(v));
const metres = (v: unknown) => (typeof v === 'number' ? `${v} m` : say(v));

/** Field names of the stored objects, and how their values read. */
const FIELDS: Record<string, { name: string; value?: (v: unknown) => string }> = {
  name: { name: 'the name' },
  areaName: { name: 'the area' },
  defaultCrs: { name: 'the coordinate system' },
  // five decimals of a degree is about a metre
  extent: { name: 'the extent', value: (v) => (Array.isArray(v) ? `W ${deg(v[0])}, S ${deg(v[1])}, E ${deg(v[2])}, N ${deg(v[3])}` : 'not set') },
  timeZone: { name: 'the time zone' },
  unitSystem: { name: 'the units', value: (v) => (v === 'imperial' ? 'imperial' : v === null ? 'as each project is set' : 'metric') },
  // ---- trench records: project record settings (lead) ----
  records: {
    name: 'the record settings',
    value: (v) => {
      if (!isObj(v)) return say(v);
      const words: Record<string, [string, string]> = {
        trenchWidthMm: ['trench width', 'mm'], trenchDepthMm: ['trench depth', 'mm'], minClearanceM: ['minimum clearance', 'm'], gapThresholdM: ['longest gap', 'm'],
        restorationMaxDelayMin: ['longest wait before laying', 'min'], layingTempTargetC: ['laying temperature', '°C'], layingTempToleranceC: ['tolerance ±', '°C'],
        compactionPassesDefault: ['compaction passes', ''], surfaceThicknessMm: ['surface thickness', 'mm'],
      };
      return Object.entries(words).filter(([k]) => typeof v[k] === 'number').map(([k, [n, u]]) => `${n} ${v[k]}${u ? ` ${u}` : ''}`).join(', ') || 'the usual figures';
    },
  },
  minCoverDepthM: { name: 'the minimum cover depth', value: metres },
  lateralToleranceM: { name: 'the lateral tolerance', value: metres },
  defaultAccuracyClass: { name: 'the usual survey accuracy', value: (v) => ACCURACY_CLASS_LABELS[v as keyof typeof ACCURACY_CLASS_LABELS] ?? say(v) },
  accuracySigmas: {
    name: 'the typical position errors',
    value: (v) => {
      if (!isObj(v) || Object.keys(v).length === 0) return 'the usual figures';
      return Object.entries(v)
        .map(([k, s]) => `${ACCURACY_CLASS_LABELS[k as keyof typeof ACCURACY_CLASS_LABELS] ?? k} ${s} m`)
        .join(', ');
    },
  },
  ownerOrgName: { name: 'the network owner' },
  contractorOrgName: { name: 'the contractor' },
  ownerOrganisation: { name: 'the network owner' },
  contractorOrganisation: { name: 'the contractor' },
  role: { name: 'the role' },
  active: { name: 'access', value: (v) => (v ? 'active' : 'deactivated') },
  status: { name: 'the status' },
  review: { name: 'the review' },
  comment: { name: 'the comment' },
  reason: { name: 'the reason' },
};

// ids and internal columns add nothing a person can act on
const HIDDEN = new Set(['id', 'ownerOrgId', 'contractorOrgId', 'createdAt', 'updatedAt', 'sha256', 'passwordHash', 'colourSequenceId']);

/** Any stored value in words: no braces, no quotes. */
export function say(v: unknown): string {
  if (v === null || v === undefined || v === '') return 'nothing';
  if (typeof v === 'boolean') return v ? 'yes' : 'no';
  if (Array.isArray(v)) return v.length === 0 ? 'nothing' : v.map(say).join(', ');
  if (isObj(v)) {
    return Object.entries(v)
      .filter(([k]) => !HIDDEN.has(k))
      .map(([k, x]) => `${words(k)} ${say(x)}`)
      .join(', ');
  }
  return String(v);
}

/** camelCase or snake_case to plain words: "lateralToleranceM" → "lateral tolerance m". */
export function words(key: string): string {
  return FIELDS[key]?.name.replace(/^the /, '') ?? key.replace(/_/g, ' ').replace(/([a-z])([A-Z])/g, '$1 $2').toLowerCase();
}

const valueOf = (k: string, v: unknown) => (FIELDS[k]?.value ?? say)(v);

/** "the lateral tolerance from 0.5 m to 0.75 m; the area from nothing to Quillhaven North" */
function changes(before: unknown, after: unknown): string {
  const b = isObj(before) ? before : {};
  const a = isObj(after) ? after : {};
  const keys = Object.keys(a).filter((k) => !HIDDEN.has(k) && JSON.stringify(a[k]) !== JSON.stringify(b[k]));
  return keys.map((k) => `${FIELDS[k]?.name ?? words(k)} from ${valueOf(k, b[k])} to ${valueOf(k, a[k])}`).join('; ');
}

// short reasons for the log; the upload form says more
const REFUSAL: Record<string, string> = {
  crs_required: 'no coordinate system given',
  unknown_crs: 'unknown coordinate system',
  swapped_axes: 'coordinates look swapped',
  out_of_range: 'positions outside the world',
  malformed: 'damaged or unreadable rows',
  unsafe_xml: 'XML with a DOCTYPE or entities',
  unsafe_zip: 'unsafe paths in the zip',
  zip_limits: 'zip too large when unpacked',
  missing_parts: 'shapefile parts missing',
  too_few_points: 'no line with two points',
};
const SIDE = (v: unknown) => (v === 'owner' ? 'network owner' : 'contractor');
const capital = (s: string) => (s ? s[0].toUpperCase() + s.slice(1) : s);
/** A person's own words, ended with one full stop. */
const quoted = (v: unknown) => `${say(v).replace(/[.\s]+$/, '')}.`;

// ---- road crossings and photos (issue 14) ----
type FieldWords = Record<string, { name: string; value?: (v: unknown) => string }>;
const CROSSING_FIELDS: FieldWords = {
  built: { name: 'built' },
  builtOn: { name: 'the date built' },
  lengthM: { name: 'the measured length', value: metres },
  sawnBeforeMain: { name: 'sawn before the lengthways cut' },
  ductCount: { name: 'the number of ducts' },
  ductSize: { name: 'the duct size' },
  addressRef: { name: 'the address' },
  note: { name: 'the note' },
  fromChainageM: { name: 'the start chainage', value: metres },
  toChainageM: { name: 'the end chainage', value: metres },
};
const PHOTO_FIELDS: FieldWords = {
  caption: { name: 'the caption' },
  place: { name: 'the place' },
  crossing: { name: 'the road crossing it shows', value: (v) => (v ? `road crossing ${say(v)}` : 'nothing') },
  pitId: { name: 'the test pit it shows', value: (v) => (v ? 'a test pit' : 'nothing') },
};
/** Changed fields in the words of `fields`; keys it does not name are left out. */
function changesIn(fields: FieldWords, b: Obj, a: Obj): string {
  return Object.keys(fields)
    .filter((k) => JSON.stringify(a[k] ?? null) !== JSON.stringify(b[k] ?? null))
    .map((k) => `${fields[k].name} from ${(fields[k].value ?? say)(b[k] ?? null)} to ${(fields[k].value ?? say)(a[k] ?? null)}`)
    .join('; ');
}
function crossingFacts(a: Obj): string {
  if (!a.built) return 'as not built yet';
  const facts: string[] = [];
  if (typeof a.lengthM === 'number') facts.push(`${a.lengthM} m`);
  if (typeof a.sawnBeforeMain === 'boolean') facts.push(a.sawnBeforeMain ? 'sawn before the lengthways cut' : 'sawn after the lengthways cut');
  if (typeof a.ductCount === 'number') facts.push(`${a.ductCount} × ${a.ductSize ? `${say(a.ductSize)} ` : ''}${a.ductCount === 1 ? 'duct' : 'ducts'}`);
  return `as built${a.builtOn ? ` on ${say(a.builtOn)}` : ''}${facts.length ? `, ${facts.join(', ')}` : ''}`;
}
const PLACED_BY: Record<string, string> = {
  exif: 'placed from its own GPS position', hand: 'placed by hand', chainage: 'placed at a typed chainage', crossing: 'placed at its road crossing', pit: 'placed at its test pit',
};
const photoPlace = (a: Obj) => `${say(a.route)} at ${say(a.chainageM)} m`;
const withPlace = (a: Obj): Obj => ({ ...a, place: a.route === undefined ? undefined : photoPlace(a) });
// ---- end of road crossings and photos ----

// ---- duct bundles, joints and catalogues (issue 14, ducts part) ----
const yesNo = (v: unknown) => (v === true ? 'yes' : v === false ? 'no' : 'not said');
const DUCT_FIELDS: FieldWords = {
  routeRef: { name: 'the route' },
  fromChainageM: { name: 'the start', value: metres },
  toChainageM: { name: 'the end', value: metres },
  ducts: { name: 'the ducts' },
  colours: { name: 'the colours' },
  tracerWire: { name: 'tracer wire', value: yesNo },
  warningTape: { name: 'warning tape', value: yesNo },
  protectiveFill: { name: 'protective fill', value: yesNo },
  note: { name: 'the note' },
};
const stretchOf = (o: Obj) => `${say(o.routeRef)} from ${metres(o.fromChainageM)} to ${metres(o.toChainageM)}`;
const JOINT_KIND = (v: unknown) => (v === 'connector' ? 'a connector' : 'a joint');
const ductList = (v: unknown) => (Array.isArray(v) && v.length === 1 ? `duct ${v[0]}` : `ducts ${say(v)}`);

// ---- surface restoration and daily production (issue 14, restoration part) ----
const mm = (v: unknown) => (typeof v === 'number' ? `${v} mm` : say(v));
const RESTORATION_FIELDS: FieldWords = {
  fromChainageM: { name: 'the start', value: metres },
  toChainageM: { name: 'the end', value: metres },
  restoredAt: { name: 'the time' },
  backfillMaterial: { name: 'the backfill' },
  compactionPasses: { name: 'the compaction passes' },
  requiredThicknessMm: { name: 'the required thickness', value: mm },
  laidThicknessMm: { name: 'the laid thickness', value: mm },
  edgesCleanedAt: { name: 'the time the edges were cleaned' },
  surfaceLaidAt: { name: 'the time the surface was laid' },
  crew: { name: 'the crew' },
  note: { name: 'the note' },
  temperaturesC: { name: 'the laying temperatures', value: (v) => (Array.isArray(v) && v.length > 0 ? `${v.join(', ')} °C` : 'none') },
};
const restoredStretch = (o: Obj) => `${say(o.route)} ${say(o.fromChainageM)}–${say(o.toChainageM)} m`;
const PRODUCTION_WORDS: Record<string, string> = {
  sawn_m: 'the metres sawn', laid_m: 'the metres laid', backfilled_m: 'the metres backfilled', restored_m: 'the metres restored', crossings: 'the crossings made', pits: 'the pits dug',
};
const productionOf = (o: Obj) => `${PRODUCTION_WORDS[String(o.quantity)] ?? say(o.quantity)} of ${o.crew ? say(o.crew) : 'no crew named'} on ${say(o.day)}`;
// ---- end of surface restoration and daily production ----

// ---- depth readings, test pits and utility crossings (issue 14, depths part) ----
const DEPTH_FIELDS: FieldWords = {
  routeRef: { name: 'the route' },
  chainageM: { name: 'the chainage', value: metres },
  coverM: { name: 'the cover', value: metres },
  trenchDepthM: { name: 'the trench depth', value: metres },
  measuredAt: { name: 'the time measured' },
  note: { name: 'the note' },
};
const PIT_METHOD: Record<string, string> = { hand_dug: 'by hand', vacuum: 'by vacuum excavation', other: 'another way' };
const PIT_FIELDS: FieldWords = {
  name: { name: 'the name' },
  routeRef: { name: 'the route' },
  chainageM: { name: 'the chainage', value: metres },
  dugOn: { name: 'the day dug' },
  method: { name: 'how it was dug', value: (v) => PIT_METHOD[String(v)] ?? say(v) },
  depthM: { name: 'the depth', value: metres },
  findings: { name: 'the findings' },
};
const FOUND_BY: Record<string, string> = { gpr: 'ground-penetrating radar', test_pit: 'a test pit', records: 'records', other: 'other means' };
const UTILITY_FIELDS: FieldWords = {
  utility: { name: 'the utility' },
  owner: { name: 'its owner' },
  routeRef: { name: 'the route' },
  chainageM: { name: 'the chainage', value: metres },
  depthM: { name: 'the depth', value: metres },
  clearanceM: { name: 'the clearance', value: metres },
  method: { name: 'how it was found', value: (v) => FOUND_BY[String(v)] ?? say(v) },
  foundOn: { name: 'the day found' },
  pit: { name: 'the test pit' },
  note: { name: 'the note' },
};
const pointOf = (o: Obj) => `${say(o.routeRef)} at ${metres(o.chainageM)}`;
const pitName = (o: Obj) => (o.name ? `test pit ${say(o.name)}` : 'a test pit');
// ---- end of depth readings, test pits and utility crossings ----

/**
 * One audit entry as a sentence. `describeAudit({ objectType: 'project', action: 'update',
 * before: { lateralToleranceM: 0.5 }, after: { lateralToleranceM: 0.75 } })` is
 * "Changed the lateral tolerance from 0.5 m to 0.75 m."
 */
export function describeAudit(e: AuditLike): string {
  const a = isObj(e.after) ? e.after : {};
  const b = isObj(e.before) ? e.before : {};
  const key = `${e.objectType} ${e.action}`;
  switch (key) {
    case 'project create':
      return `Created the project ${say(a.name)} (network owner ${say(a.ownerOrgName)}, contractor ${say(a.contractorOrgName)}).`;
    case 'project update': {
      const c = changes(b, a);
      return c ? `Changed ${c}.` : 'Saved the settings without changes.';
    }
    case 'project extent_from_plan':
      return `Set the project's extent from the planned network (${valueOf('extent', a.extent)}).`;
    case 'org_change propose':
      return `Proposed to change the ${SIDE(a.side)} from ${say(a.from)} to ${say(a.to)}, waiting for ${say(a.waitingFor)} to confirm. Reason: ${quoted(a.reason)}`;
    case 'org_change confirm':
      return `Confirmed the change of ${SIDE(a.side)} from ${say(a.from)} to ${say(a.to)}.${a.note ? ` Note: ${quoted(a.note)}` : ''}`;
    case 'org_change decline':
      return `Declined the change of ${SIDE(a.side)} from ${say(a.from)} to ${say(a.to)}.${a.note ? ` Note: ${quoted(a.note)}` : ''}`;
    case 'org_change withdraw':
      return `Withdrew the proposal to change the ${SIDE(a.side)} to ${say(a.to)}.`;
    case 'organisation register':
    case 'organisation create':
      return `Registered the ${SIDE(a.kind)} ${say(a.name)}.`;
    case 'organisation contact':
      return a.contact ? `Set the organisation's contact for the duct lookup to ${quoted(a.contact)}` : "Removed the organisation's contact from the duct lookup.";
    case 'section review_approved':
    case 'section review_rejected':
    case 'section review_acknowledged': {
      const what = { review_approved: 'Approved the section', review_rejected: 'Returned the section', review_acknowledged: 'Acknowledged the section as not built' }[e.action as 'review_approved'];
      const bulk = Number(a.bulk ?? 0) > 1 ? ` (one of ${Number(a.bulk)} reviewed together)` : '';
      return `${what}${bulk}.${a.comment ? ` Comment: ${quoted(a.comment)}` : ''}`;
    }
    case 'reconcile_run run':
      return `Matched the uploads to the plan: ${Number(a.matched ?? 0).toLocaleString('en-GB')} of ${plural(Number(a.fixes ?? 0), 'fix', 'fixes')} on a planned route; ${plural(Number(a.sections ?? 0), 'section')} (${Number(a.created ?? 0)} new, ${Number(a.retired ?? 0)} retired).`;
    case 'plan_version import':
      return `Imported version ${say(a.version)} of the planned network: ${plural(Number(a.routes ?? 0), 'route')}; ${Number(a.added ?? 0)} added, ${Number(a.removed ?? 0)} removed, ${Number(a.reshaped ?? 0)} reshaped, ${Number(a.retagged ?? 0)} retagged.`;
    case 'address_import import': {
      const what = a.partial ? 'Imported part of the address register (added and updated only)' : 'Imported the address register';
      return `${what} from ${say(a.fileName)}: ${plural(Number(a.rows ?? 0), 'address', 'addresses')}; ${['added', 'changed', 'removed', 'restored', 'unchanged'].map((k) => `${Number(a[k] ?? 0).toLocaleString('en-GB')} ${k}`).join(', ')}.`;
    }
    case 'address connect':
      return `Recorded the drop at address ${say(a.key)} as installed${a.connectedOn ? ` on ${say(a.connectedOn)}` : ''}.`;
    case 'address disconnect':
      return `Took back the drop at address ${say(a.key)}: no longer recorded as installed.`;
    case 'upload create': {
      const names = say(a.fileName);
      if (a.status === 'failed') return `Uploaded ${names}; it was refused (${REFUSAL[String(a.error)] ?? say(a.error)}) and kept for another try.`;
      return `Uploaded ${names}: ${plural(Number(a.featureCount), 'line or point', 'lines and points')}, ${plural(Number(a.pointCount), 'position')}${a.crs ? ` in ${say(a.crs)}` : ''}.`;
    }
    case 'upload retry':
      return `Read a refused upload again${isObj(a.settings) && a.settings.crs ? ` in ${say(a.settings.crs)}` : ''}: ${a.status === 'stored' ? 'now stored' : `still refused (${REFUSAL[String(a.error)] ?? say(a.error)})`}.`;
    case 'upload withdraw':
      return `Withdrew an upload from the record. Reason: ${quoted(a.reason)}`;
    case 'upload accuracy': {
      const b = isObj(e.before) ? e.before : {};
      const label = (c: unknown) => ACCURACY_CLASS_LABELS[c as AccuracyClass] ?? say(c);
      return `Set the upload's accuracy to ${label(a.accuracyClass)} (σ ${say(a.sigmaM)} m); it was ${label(b.accuracyClass)} (σ ${say(b.sigmaM)} m). The project is reconciled again.`;
    }
    case 'upload exclude_range':
      return `Left ${a.kind === 'time' ? `the time from ${say(a.from)} to ${say(a.to)}` : `${say(a.from)}–${say(a.to)} m`} of an upload out of matching. Reason: ${quoted(a.reason)}`;
    case 'upload include_range':
      return 'Took a left-out range of an upload back into matching.';
    // the owner's review of handover packages (issue 16, helper E2)
    case 'handover accept':
    case 'handover return': {
      const cs = Array.isArray(a.comments) ? (a.comments as Obj[]) : [];
      const said = cs.map((c) => `${c.section ? `section ${say(c.section)}` : 'the package'}: “${say(c.text)}”`).join('; ');
      return `${e.action === 'accept' ? 'Accepted' : 'Returned'} handover revision ${say(a.revision)}${cs.length ? ` with ${plural(cs.length, 'comment')} (${said})` : ''}.`;
    }
    case 'handover answer': {
      const n = Array.isArray(a.answers) ? a.answers.length : 0;
      return `Answered ${plural(n, 'comment')} of the network owner on handover revision ${say(a.revision)}.`;
    }
    // building handover packages (issue 16, helper E1)
    case 'handover build': {
      const sc = isObj(a.scope) ? a.scope : {};
      const routes = Array.isArray(sc.routes) ? (sc.routes as unknown[]) : [];
      const where = routes.length ? ` of route${routes.length === 1 ? '' : 's'} ${routes.map(say).join(', ')}` : Array.isArray(sc.bbox) ? ' of an area' : ' of every approved section';
      return `Started building handover revision ${say(a.revision)}${where}.`;
    }
    case 'handover issue': {
      const c = isObj(a.changes) ? a.changes : {};
      return `Issued handover revision ${say(a.revision)} (${say(c.added)} sections added, ${say(c.removed)} removed, ${say(c.changed)} changed).`;
    }
    case 'handover fail':
      return `Handover revision ${say(a.revision)} failed: ${say(a.reason)}`;
    // road crossings and photos (issue 14)
    case 'road_crossing create':
      return `Recorded road crossing ${say(a.route)} ${crossingFacts(a)}.`;
    case 'road_crossing update': {
      const c = changesIn(CROSSING_FIELDS, b, a);
      return c ? `Changed road crossing ${say(a.route)}: ${c}.` : `Saved road crossing ${say(a.route)} without changes.`;
    }
    case 'road_crossing delete':
      return `Removed the record of road crossing ${say(b.route)}.`;
    case 'photo create':
      return `Added the photo ${say(a.fileName)} on ${photoPlace(a)}, ${PLACED_BY[String(a.placedBy)] ?? say(a.placedBy)}${a.crossing ? `, showing road crossing ${say(a.crossing)}` : ''}.${a.caption ? ` Caption: ${quoted(a.caption)}` : ''}`;
    case 'photo update': {
      const c = changesIn(PHOTO_FIELDS, withPlace(b), withPlace(a));
      return c ? `Changed the photo ${say(a.fileName)}: ${c}.` : `Saved the photo ${say(a.fileName)} without changes.`;
    }
    case 'photo delete':
      return `Removed the photo ${say(b.fileName)} (${photoPlace(b)}).`;
    // duct bundles, joints and catalogues (issue 14, ducts part)
    case 'duct_bundle create':
      return `Recorded an installed duct bundle on ${stretchOf(a)}: ${say(a.ducts)} (${say(a.colours)}); tracer wire ${yesNo(a.tracerWire)}, warning tape ${yesNo(a.warningTape)}, protective fill ${yesNo(a.protectiveFill)}.${a.note ? ` Note: ${quoted(a.note)}` : ''}`;
    case 'duct_bundle update': {
      const c = changesIn(DUCT_FIELDS, b, a);
      return c ? `Changed the duct bundle on ${stretchOf(b)}: ${c}.` : `Saved the duct bundle on ${stretchOf(a)} without changes.`;
    }
    case 'duct_bundle delete':
      return `Removed the installed duct bundle on ${stretchOf(b)} (${say(b.ducts)}).`;
    case 'duct_bundle refresh_planned':
      return `Derived the planned duct bundles from the plan again: ${plural(Number(a.created ?? 0), 'new bundle')}, ${Number(a.removed ?? 0)} removed, ${Number(a.kept ?? 0)} unchanged.`;
    case 'duct_joint create':
      return `Recorded ${JOINT_KIND(a.kind)} on ${say(a.routeRef)} at ${metres(a.chainageM)} joining ${ductList(a.ductPositions)}.${a.note ? ` Note: ${quoted(a.note)}` : ''}`;
    case 'duct_joint delete':
      return `Removed ${JOINT_KIND(b.kind)} on ${say(b.routeRef)} at ${metres(b.chainageM)}.`;
    case 'duct_size create':
      return `Added the duct size ${say(a.size)} to the catalogue${a.common ? ' as a common size' : ''}.`;
    case 'duct_size update': {
      const what: string[] = [];
      if (a.retired !== b.retired) what.push(a.retired ? 'retired it' : 'brought it back');
      if (a.common !== b.common) what.push(a.common ? 'marked it common' : 'marked it not common');
      return `Duct size ${say(a.size)}: ${what.length ? what.join(', ') : 'saved without changes'}.`;
    }
    case 'colour_sequence create':
      return `Added the colour sequence ${say(a.name)}: ${say(a.colours)}, repeated with a ${say(a.repeatMarking)}.`;
    case 'utility_kind create':
      return `Added the utility kind ${say(a.label)} (${say(a.key)}) to the catalogue.`;
    case 'backfill_material create':
      return `Added the backfill material ${say(a.label)} to the catalogue.`;
    case 'utility_kind update':
    case 'backfill_material update': {
      const what: string[] = [];
      if (a.label !== b.label) what.push(`renamed it from ${say(b.label)}`);
      if (a.retired !== b.retired) what.push(a.retired ? 'retired it' : 'brought it back');
      return `${e.objectType === 'utility_kind' ? 'Utility kind' : 'Backfill material'} ${say(a.label)}: ${what.length ? what.join(', ') : 'saved without changes'}.`;
    }
    // surface restoration and daily production (issue 14, restoration part)
    case 'restoration create':
      return `Recorded the restoration of ${restoredStretch(a)} on ${say(a.restoredAt)}: ${say(a.verdict)}.`;
    case 'restoration update': {
      const c = changesIn(RESTORATION_FIELDS, b, a);
      const verdict = a.verdict !== b.verdict ? `; now ${say(a.verdict)}` : '';
      return c ? `Changed the restoration of ${restoredStretch(b)}: ${c}${verdict}.` : `Saved the restoration of ${restoredStretch(a)} without changes.`;
    }
    case 'restoration delete':
      return `Removed the restoration of ${restoredStretch(b)}.`;
    case 'production_correction create':
      return `Corrected ${productionOf(a)} from ${a.derived === null || a.derived === undefined ? 'nothing derived' : say(a.derived)} to ${say(a.value)}. Reason: ${quoted(a.reason)}`;
    case 'production_correction delete':
      return `Withdrew the correction of ${productionOf(b)} to ${say(b.value)}.`;
    // depth readings, test pits and utility crossings (issue 14, depths part)
    case 'depth_reading create':
      return `Recorded a depth reading on ${pointOf(a)}: cover ${metres(a.coverM)}, trench depth ${metres(a.trenchDepthM)}.${a.note ? ` Note: ${quoted(a.note)}` : ''}`;
    case 'depth_reading update': {
      const c = changesIn(DEPTH_FIELDS, b, a);
      return c ? `Changed the depth reading on ${pointOf(b)}: ${c}.` : `Saved the depth reading on ${pointOf(a)} without changes.`;
    }
    case 'depth_reading delete':
      return `Removed the depth reading on ${pointOf(b)} (cover ${metres(b.coverM)}).`;
    case 'depth_reading import':
      return `Imported ${plural(Number(a.count ?? 0), 'depth reading')} from ${say(a.fileName)}${Number(a.belowMinimum ?? 0) > 0 ? `, ${Number(a.belowMinimum)} below the minimum cover` : ''}.`;
    case 'depth_reading import_upload':
      return `Took ${plural(Number(a.count ?? 0), 'depth reading')} from the ${say(a.attribute)} attribute of the upload ${say(a.fileName)}.`;
    case 'test_pit create':
      return `Recorded ${pitName(a)} on ${pointOf(a)}, dug ${PIT_METHOD[String(a.method)] ?? say(a.method)}${a.dugOn ? ` on ${say(a.dugOn)}` : ''}${a.depthM !== null && a.depthM !== undefined ? `, ${metres(a.depthM)} deep` : ''}.${a.findings ? ` Findings: ${quoted(a.findings)}` : ''}`;
    case 'test_pit update': {
      const c = changesIn(PIT_FIELDS, b, a);
      return c ? `Changed ${pitName(b)} on ${pointOf(b)}: ${c}.` : `Saved ${pitName(a)} without changes.`;
    }
    case 'test_pit delete':
      return `Removed ${pitName(b)} on ${pointOf(b)}.`;
    case 'test_pit import_upload':
      return `Took ${plural(Number(a.count ?? 0), 'test pit')} from the points marked ${say(a.code)} in the upload ${say(a.fileName)}.`;
    case 'utility_crossing create':
      return `Recorded a ${say(a.utility).toLowerCase()} utility${a.owner ? ` of ${say(a.owner)}` : ''} on ${pointOf(a)}, found by ${FOUND_BY[String(a.method)] ?? say(a.method)}: depth ${metres(a.depthM)}, clearance ${metres(a.clearanceM)}.`;
    case 'utility_crossing update': {
      const c = changesIn(UTILITY_FIELDS, b, a);
      return c ? `Changed the ${say(b.utility).toLowerCase()} utility on ${pointOf(b)}: ${c}.` : `Saved the ${say(a.utility).toLowerCase()} utility without changes.`;
    }
    case 'utility_crossing delete':
      return `Removed the ${say(b.utility).toLowerCase()} utility on ${pointOf(b)}.`;
    default: {
      const c = changes(b, a);
      const what = `${capital(words(e.action))} ${words(e.objectType)}`;
      if (c && Object.keys(b).length > 0) return `${what}: ${c}.`;
      const details = say(a);
      return details && details !== 'nothing' ? `${what}: ${details}.` : `${what}.`;
    }
  }
}
