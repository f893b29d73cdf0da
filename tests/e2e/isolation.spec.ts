import { readdirSync, readFileSync, statSync } from 'node:fs';
import path from 'node:path';
import { expect, test, type APIRequestContext } from '@playwright/test';
import { addUserWithToken, approvedSectionFixture, DEMO, issuedHandoverFixture, json } from '../helpers/e2e';
import { gpxTrack } from '../helpers/upload-form';
// road crossings and photos: a small PNG to upload
import sharp from 'sharp';

/**
 * The isolation matrix: every method of every app/api/**\/route.ts has a row. Each row asserts 401 without
 * credentials, 404 for another organisation's object, 403 for a role without the right, and success for the
 * right role. Where a check cannot apply, the row says why instead.
 */

type Who = 'admin' | 'owner' | 'maintenance' | 'contractorAdmin' | 'engineer' | 'surveyor';
interface Ctx {
  tokens: Record<Who, string>;
  foreignToken: string;
  projectId: string;
  foreignProjectId: string;
  jobId: string;
  foreignJobId: string;
  foreignUserId: string;
  spareUserId: string;
  foreignTokenId: string;
  uploadId: string;
  foreignUploadId: string;
  failedUploadId: string;
  spareUploadId: string;
  currentSection: (req: APIRequestContext) => Promise<SectionRef>;
  foreignSectionId: string;
  correctionId: number;
  foreignCorrectionId: number;
  spareTokenId: (req: APIRequestContext) => Promise<string>;
  /** projects between the demo owner and contractor for the owner-change rows, one with a pending proposal */
  transferProjectId: string;
  proposeProjectId: string;
  orgChangeId: number;
  foreignOrgChangeId: number;
  newOwnerOrgId: string;
  /** a left-out range of uploadId, and one of foreignUploadId */
  exclusionId: number;
  foreignExclusionId: number;
}

interface SectionRef {
  id: string;
  status: string;
  fromChainageM: number;
  toChainageM: number;
}

/** A review any current section accepts: a not-built stretch is acknowledged, a built one approved. */
const reviewFor = (s: SectionRef | undefined) => (s?.status === 'not_built' ? { decision: 'acknowledge', comment: 'isolation matrix' } : { decision: 'approve', comment: 'isolation matrix' });

/** A correction any current section accepts: a reason where nothing is built, else a split in the middle. */
const correctionFor = (s: SectionRef) =>
  s.status === 'not_built' ? { kind: 'not_built_reason', reason: 'isolation matrix' } : { kind: 'split', atChainageM: (s.fromChainageM + s.toChainageM) / 2, reason: 'isolation matrix' };

interface Row {
  /** URL for the caller's own object */
  url: (c: Ctx) => string;
  /** URL of the same kind of object in another organisation, or why not applicable */
  foreign: ((c: Ctx) => string) | { na: string };
  /** a role without the right, or why not applicable */
  denied: Who | { na: string };
  allowed: Who;
  /** the request body; `section` is the current section when the URL names CURRENT or `current` is set */
  body?: (c: Ctx, section?: SectionRef) => unknown;
  /** the body names the current section (a route that takes section ids in its body) */
  current?: true;
  success: number;
  /**
   * For a route that reads across the organisation's projects (no object to name): another organisation
   * asks the same URL and gets 200 with an empty `key` list, while the allowed role's answer is not empty.
   */
  emptyForOthers?: { key: string };
}

type PublicRow = { public: string; check: (req: APIRequestContext) => Promise<void> };

const NO_OBJECT = { na: 'the route has no object of another organisation to ask for: it lists or creates within the caller’s own' };
const ALL_ROLES = { na: 'every role has this right' };

const MATRIX: Record<string, Row | PublicRow> = {
  'GET /api/health': {
    public: 'health check for operators',
    check: async (req) => {
      const r = await json(req, 'GET', '/api/health', null);
      expect(r).toEqual({ status: 200, body: { ok: true, db: 'up' } });
    },
  },
  'POST /api/welcome': {
    public: 'the one-time link is the credential',
    check: async (req) => {
      const r = await json<{ error: { code: string } }>(req, 'POST', '/api/welcome', null, { token: 'tbl_nope', password: 'long-enough-password' });
      expect(r.status).toBe(404);
      expect(r.body!.error.code).toBe('not_found');
    },
  },
  'GET /api/auth/[...nextauth]': {
    public: 'next-auth sign-in endpoints',
    check: async (req) => expect((await req.get('/api/auth/providers')).status()).toBe(200),
  },
  'POST /api/auth/[...nextauth]': {
    public: 'next-auth sign-in endpoints',
    check: async (req) => {
      // without next-auth's CSRF token a credentials post does not sign anyone in
      const res = await req.post('/api/auth/callback/credentials', { form: { email: DEMO.admin, password: 'quillhaven-demo-2026' }, maxRedirects: 0 });
      expect(res.headers()['set-cookie'] ?? '').not.toContain('next-auth.session-token');
    },
  },
  'GET /api/me': { url: () => '/api/me', foreign: NO_OBJECT, denied: ALL_ROLES, allowed: 'maintenance', success: 200 },
  'PATCH /api/me': { url: () => '/api/me', foreign: { na: 'a person changes only their own units' }, denied: ALL_ROLES, allowed: 'maintenance', body: () => ({ unitSystem: null }), success: 200 },
  'GET /api/me/organisation': { url: () => '/api/me/organisation', foreign: { na: 'reads only the caller’s own organisation' }, denied: ALL_ROLES, allowed: 'maintenance', success: 200 },
  'PATCH /api/me/organisation': {
    url: () => '/api/me/organisation',
    foreign: { na: 'sets only the caller’s own organisation’s contact' },
    denied: 'engineer',
    allowed: 'admin',
    body: () => ({ contact: 'Matrix network desk, 555 0199' }),
    success: 200,
  },
  // ---- trench records: quality checks (lead) ----
  'GET /api/projects/[projectId]/checks': {
    url: (c) => `/api/projects/${c.projectId}/checks`,
    foreign: (c) => `/api/projects/${c.foreignProjectId}/checks`,
    denied: ALL_ROLES,
    allowed: 'owner',
    success: 200,
  },
  // ---- duct lookup (issue 17): across the organisation's projects; another organisation sees nothing ----
  'GET /api/lookup/addresses': {
    url: () => '/api/lookup/addresses?q=Lanternfield%20Road%202',
    foreign: { na: 'searches every project of the caller’s organisation; another organisation gets an empty list (emptyForOthers)' },
    denied: ALL_ROLES,
    allowed: 'maintenance',
    success: 200,
    emptyForOthers: { key: 'candidates' },
  },
  'GET /api/lookup/nearby': {
    // 50 m east of the demo's origin, on Lanternfield Road (QN-101)
    url: () => '/api/lookup/nearby?lon=9.10473&lat=52.10602&radius=60',
    foreign: { na: 'reads the sections of the caller’s organisation’s projects near a spot; another organisation gets an empty list (emptyForOthers)' },
    denied: ALL_ROLES,
    allowed: 'maintenance',
    success: 200,
    emptyForOthers: { key: 'stretches' },
  },
  'GET /api/projects': { url: () => '/api/projects', foreign: NO_OBJECT, denied: ALL_ROLES, allowed: 'surveyor', success: 200 },
  'POST /api/projects': {
    url: () => '/api/projects',
    foreign: NO_OBJECT,
    denied: 'engineer',
    allowed: 'admin',
    body: () => ({ name: `Matrix project ${Date.now()}`, partnerOrganisation: 'Tarnwick Slot & Duct Ltd' }),
    success: 201,
  },
  'GET /api/projects/[projectId]': {
    url: (c) => `/api/projects/${c.projectId}`,
    foreign: (c) => `/api/projects/${c.foreignProjectId}`,
    denied: ALL_ROLES,
    allowed: 'engineer',
    success: 200,
  },
  'PATCH /api/projects/[projectId]': {
    url: (c) => `/api/projects/${c.projectId}`,
    foreign: (c) => `/api/projects/${c.foreignProjectId}`,
    denied: 'engineer',
    allowed: 'admin',
    body: () => ({ areaName: 'Quillhaven North' }),
    success: 200,
  },
  'GET /api/projects/[projectId]/audit': {
    url: (c) => `/api/projects/${c.projectId}/audit`,
    foreign: (c) => `/api/projects/${c.foreignProjectId}/audit`,
    denied: 'owner',
    allowed: 'contractorAdmin',
    success: 200,
  },
  'POST /api/projects/[projectId]/audit/exports': {
    url: (c) => `/api/projects/${c.projectId}/audit/exports`,
    foreign: (c) => `/api/projects/${c.foreignProjectId}/audit/exports`,
    denied: 'surveyor',
    allowed: 'admin',
    success: 202,
  },
  'GET /api/jobs/[jobId]': {
    url: (c) => `/api/jobs/${c.jobId}`,
    foreign: (c) => `/api/jobs/${c.foreignJobId}`,
    denied: ALL_ROLES,
    allowed: 'maintenance',
    success: 200,
  },
  'GET /api/jobs/[jobId]/result': {
    url: (c) => `/api/jobs/${c.jobId}/result`,
    foreign: (c) => `/api/jobs/${c.foreignJobId}/result`,
    denied: 'surveyor',
    allowed: 'admin',
    success: 200,
  },
  'GET /api/users': { url: () => '/api/users', foreign: NO_OBJECT, denied: 'engineer', allowed: 'admin', success: 200 },
  'POST /api/users': {
    url: () => '/api/users',
    foreign: NO_OBJECT,
    denied: 'owner',
    allowed: 'admin',
    body: () => ({ email: `matrix-${Date.now()}@test.example`, name: 'Matrix Person', role: 'owner', onboarding: 'invitation' }),
    success: 201,
  },
  'PATCH /api/users/[userId]': {
    // the engineer asks about a colleague of their own organisation, so only the role stands in the way
    url: (c) => `/api/users/${c.spareUserId}`,
    foreign: (c) => `/api/users/${c.foreignUserId}`,
    denied: 'maintenance',
    allowed: 'admin',
    body: () => ({ name: 'Spare Person (renamed)' }),
    success: 200,
  },
  'GET /api/tokens': { url: () => '/api/tokens', foreign: NO_OBJECT, denied: ALL_ROLES, allowed: 'owner', success: 200 },
  'POST /api/tokens': { url: () => '/api/tokens', foreign: NO_OBJECT, denied: ALL_ROLES, allowed: 'surveyor', body: () => ({ name: 'matrix' }), success: 201 },
  'DELETE /api/tokens/[tokenId]': {
    url: () => '/api/tokens/SPARE',
    foreign: (c) => `/api/tokens/${c.foreignTokenId}`,
    denied: ALL_ROLES,
    allowed: 'engineer',
    success: 200,
  },
  'GET /api/projects/[projectId]/uploads': {
    url: (c) => `/api/projects/${c.projectId}/uploads`,
    foreign: (c) => `/api/projects/${c.foreignProjectId}/uploads`,
    denied: ALL_ROLES,
    allowed: 'maintenance',
    success: 200,
  },
  'POST /api/projects/[projectId]/uploads': {
    url: (c) => `/api/projects/${c.projectId}/uploads`,
    foreign: (c) => `/api/projects/${c.foreignProjectId}/uploads`,
    denied: 'owner',
    allowed: 'surveyor',
    body: () => gpxForm(),
    success: 201,
  },
  'POST /api/projects/[projectId]/uploads/preview': {
    url: (c) => `/api/projects/${c.projectId}/uploads/preview`,
    foreign: (c) => `/api/projects/${c.foreignProjectId}/uploads/preview`,
    denied: 'maintenance',
    allowed: 'engineer',
    body: () => gpxForm(),
    success: 200,
  },
  'GET /api/projects/[projectId]/uploads/[uploadId]': {
    url: (c) => `/api/projects/${c.projectId}/uploads/${c.uploadId}?geometry=geojson`,
    foreign: (c) => `/api/projects/${c.foreignProjectId}/uploads/${c.foreignUploadId}`,
    denied: ALL_ROLES,
    allowed: 'owner',
    success: 200,
  },
  'PATCH /api/projects/[projectId]/uploads/[uploadId]': {
    // the refused upload, before the retry row stores it: a failed upload changes class without a reconciliation
    url: (c) => `/api/projects/${c.projectId}/uploads/${c.failedUploadId}`,
    foreign: (c) => `/api/projects/${c.foreignProjectId}/uploads/${c.foreignUploadId}`,
    denied: 'owner',
    allowed: 'surveyor',
    body: () => ({ accuracy: 'rtk_gnss' }),
    success: 200,
  },
  'GET /api/projects/[projectId]/uploads/[uploadId]/original': {
    url: (c) => `/api/projects/${c.projectId}/uploads/${c.uploadId}/original`,
    foreign: (c) => `/api/projects/${c.foreignProjectId}/uploads/${c.foreignUploadId}/original`,
    denied: ALL_ROLES,
    allowed: 'maintenance',
    success: 200,
  },
  'POST /api/projects/[projectId]/uploads/[uploadId]/retry': {
    url: (c) => `/api/projects/${c.projectId}/uploads/${c.failedUploadId}/retry`,
    foreign: (c) => `/api/projects/${c.foreignProjectId}/uploads/${c.foreignUploadId}/retry`,
    denied: 'owner',
    allowed: 'surveyor',
    body: () => ({ crs: 'EPSG:25832' }),
    success: 200,
  },
  'POST /api/projects/[projectId]/uploads/[uploadId]/withdraw': {
    url: (c) => `/api/projects/${c.projectId}/uploads/${c.spareUploadId}/withdraw`,
    foreign: (c) => `/api/projects/${c.foreignProjectId}/uploads/${c.foreignUploadId}/withdraw`,
    denied: 'maintenance',
    allowed: 'engineer',
    body: () => ({ reason: 'isolation matrix' }),
    success: 200,
  },
  'GET /api/projects/[projectId]/planned': {
    url: (c) => `/api/projects/${c.projectId}/planned?format=geojson`,
    foreign: (c) => `/api/projects/${c.foreignProjectId}/planned`,
    denied: ALL_ROLES,
    allowed: 'maintenance',
    success: 200,
  },
  'POST /api/projects/[projectId]/planned': {
    url: (c) => `/api/projects/${c.projectId}/planned`,
    foreign: (c) => `/api/projects/${c.foreignProjectId}/planned`,
    denied: 'surveyor',
    allowed: 'engineer',
    body: () => ({
      multipart: {
        file: {
          name: 'design.geojson',
          mimeType: 'application/geo+json',
          buffer: Buffer.from(JSON.stringify({ type: 'Feature', properties: { ref: `M-${Date.now()}` }, geometry: { type: 'LineString', coordinates: [[9.11, 52.105], [9.1105, 52.1052]] } })),
        },
      },
    }),
    success: 201,
  },
  'POST /api/projects/[projectId]/uploads/[uploadId]/exclusions': {
    url: (c) => `/api/projects/${c.projectId}/uploads/${c.uploadId}/exclusions`,
    foreign: (c) => `/api/projects/${c.foreignProjectId}/uploads/${c.foreignUploadId}/exclusions`,
    denied: 'surveyor',
    allowed: 'engineer',
    body: () => ({ kind: 'distance', from: 0, to: 1, reason: 'isolation matrix' }),
    success: 201,
  },
  'DELETE /api/projects/[projectId]/uploads/[uploadId]/exclusions/[exclusionId]': {
    url: (c) => `/api/projects/${c.projectId}/uploads/${c.uploadId}/exclusions/${c.exclusionId}`,
    foreign: (c) => `/api/projects/${c.foreignProjectId}/uploads/${c.foreignUploadId}/exclusions/${c.foreignExclusionId}`,
    denied: 'surveyor',
    allowed: 'engineer',
    success: 200,
  },
  'POST /api/projects/[projectId]/reconcile': {
    url: (c) => `/api/projects/${c.projectId}/reconcile`,
    foreign: (c) => `/api/projects/${c.foreignProjectId}/reconcile`,
    denied: 'surveyor',
    allowed: 'engineer',
    success: 202,
  },
  'GET /api/projects/[projectId]/sections': {
    url: (c) => `/api/projects/${c.projectId}/sections?format=geojson`,
    foreign: (c) => `/api/projects/${c.foreignProjectId}/sections`,
    denied: ALL_ROLES,
    allowed: 'owner',
    success: 200,
  },
  'GET /api/projects/[projectId]/tiles/[layer]/[z]/[x]/[y]': {
    url: (c) => `/api/projects/${c.projectId}/tiles/all/0/0/0.mvt`,
    foreign: (c) => `/api/projects/${c.foreignProjectId}/tiles/all/0/0/0.mvt`,
    denied: ALL_ROLES,
    allowed: 'owner',
    success: 200,
  },
  'POST /api/sections/[sectionId]/review': {
    // resolved when the test runs: a later plan revision in this file may retire the sections seen at the start
    url: () => '/api/sections/CURRENT/review',
    foreign: (c) => `/api/sections/${c.foreignSectionId}/review`,
    denied: 'surveyor',
    allowed: 'engineer',
    body: (_c, section) => reviewFor(section),
    success: 200,
  },
  'POST /api/projects/[projectId]/sections/review': {
    url: (c) => `/api/projects/${c.projectId}/sections/review`,
    foreign: (c) => `/api/projects/${c.foreignProjectId}/sections/review`,
    denied: 'surveyor',
    allowed: 'engineer',
    current: true,
    body: (_c, section) => ({ sectionIds: [section!.id], ...reviewFor(section) }),
    success: 200,
  },
  'GET /api/sections/[sectionId]': {
    url: () => '/api/sections/CURRENT',
    foreign: (c) => `/api/sections/${c.foreignSectionId}`,
    denied: ALL_ROLES,
    allowed: 'maintenance',
    success: 200,
  },
  'POST /api/sections/[sectionId]/corrections': {
    url: () => '/api/sections/CURRENT/corrections',
    foreign: (c) => `/api/sections/${c.foreignSectionId}/corrections`,
    denied: 'surveyor',
    allowed: 'engineer',
    body: (_c, section) => section && correctionFor(section),
    success: 202,
  },
  'GET /api/projects/[projectId]/corrections': {
    url: (c) => `/api/projects/${c.projectId}/corrections`,
    foreign: (c) => `/api/projects/${c.foreignProjectId}/corrections`,
    denied: ALL_ROLES,
    allowed: 'owner',
    success: 200,
  },
  'DELETE /api/corrections/[correctionId]': {
    url: (c) => `/api/corrections/${c.correctionId}`,
    foreign: (c) => `/api/corrections/${c.foreignCorrectionId}`,
    denied: 'surveyor',
    allowed: 'engineer',
    success: 200,
  },
  'GET /api/organisations': { url: () => '/api/organisations?kind=owner', foreign: NO_OBJECT, denied: 'engineer', allowed: 'admin', success: 200 },
  'POST /api/organisations': {
    url: () => '/api/organisations',
    foreign: NO_OBJECT,
    denied: 'owner',
    allowed: 'contractorAdmin',
    body: () => ({ name: `Matrix Owner ${Date.now()}`, kind: 'owner' }),
    success: 201,
  },
  'GET /api/projects/[projectId]/org-changes': {
    url: (c) => `/api/projects/${c.transferProjectId}/org-changes`,
    foreign: (c) => `/api/projects/${c.foreignProjectId}/org-changes`,
    denied: ALL_ROLES,
    allowed: 'owner',
    success: 200,
  },
  'POST /api/projects/[projectId]/org-changes': {
    url: (c) => `/api/projects/${c.proposeProjectId}/org-changes`,
    foreign: (c) => `/api/projects/${c.foreignProjectId}/org-changes`,
    denied: 'engineer',
    allowed: 'contractorAdmin',
    body: (c) => ({ side: 'owner', organisationId: c.newOwnerOrgId, reason: 'isolation matrix' }),
    success: 201,
  },
  'PATCH /api/projects/[projectId]/org-changes/[changeId]': {
    // the proposing side withdraws its own proposal: nothing moves
    url: (c) => `/api/projects/${c.transferProjectId}/org-changes/${c.orgChangeId}`,
    foreign: (c) => `/api/projects/${c.foreignProjectId}/org-changes/${c.foreignOrgChangeId}`,
    denied: 'engineer',
    allowed: 'contractorAdmin',
    body: () => ({ decision: 'withdraw' }),
    success: 200,
  },
  // ---- trench records: road crossings and photos (helper) ----
  'GET /api/projects/[projectId]/road-crossings': {
    url: () => `/api/projects/${rp.projectId}/road-crossings`,
    foreign: () => `/api/projects/${rp.foreignProjectId}/road-crossings`,
    denied: ALL_ROLES,
    allowed: 'maintenance',
    success: 200,
  },
  'POST /api/projects/[projectId]/road-crossings': {
    url: () => `/api/projects/${rp.projectId}/road-crossings`,
    foreign: () => `/api/projects/${rp.foreignProjectId}/road-crossings`,
    denied: 'owner',
    allowed: 'surveyor',
    body: () => ({ routeId: rp.freeCrossingRouteId, built: true, builtOn: '2026-11-03', lengthM: 9.2 }),
    success: 201,
  },
  'PATCH /api/projects/[projectId]/road-crossings/[crossingId]': {
    url: () => `/api/projects/${rp.projectId}/road-crossings/${rp.crossingId}`,
    foreign: () => `/api/projects/${rp.foreignProjectId}/road-crossings/${rp.foreignCrossingId}`,
    denied: 'owner',
    allowed: 'engineer',
    body: () => ({ note: 'isolation matrix' }),
    success: 200,
  },
  'DELETE /api/projects/[projectId]/road-crossings/[crossingId]': {
    url: () => `/api/projects/${rp.projectId}/road-crossings/${rp.spareCrossingId}`,
    foreign: () => `/api/projects/${rp.foreignProjectId}/road-crossings/${rp.foreignCrossingId}`,
    denied: 'maintenance',
    allowed: 'surveyor',
    success: 200,
  },
  'GET /api/projects/[projectId]/photos': {
    url: () => `/api/projects/${rp.projectId}/photos`,
    foreign: () => `/api/projects/${rp.foreignProjectId}/photos`,
    denied: ALL_ROLES,
    allowed: 'owner',
    success: 200,
  },
  'POST /api/projects/[projectId]/photos': {
    url: () => `/api/projects/${rp.projectId}/photos`,
    foreign: () => `/api/projects/${rp.foreignProjectId}/photos`,
    denied: 'owner',
    allowed: 'surveyor',
    body: () => photoForm(rp.newPhoto, rp.at(120, 1)),
    success: 201,
  },
  'GET /api/projects/[projectId]/photos/[photoId]': {
    url: () => `/api/projects/${rp.projectId}/photos/${rp.photoId}`,
    foreign: () => `/api/projects/${rp.foreignProjectId}/photos/${rp.foreignPhotoId}`,
    denied: ALL_ROLES,
    allowed: 'maintenance',
    success: 200,
  },
  'PATCH /api/projects/[projectId]/photos/[photoId]': {
    url: () => `/api/projects/${rp.projectId}/photos/${rp.photoId}`,
    foreign: () => `/api/projects/${rp.foreignProjectId}/photos/${rp.foreignPhotoId}`,
    denied: 'maintenance',
    allowed: 'engineer',
    body: () => ({ caption: 'isolation matrix' }),
    success: 200,
  },
  'DELETE /api/projects/[projectId]/photos/[photoId]': {
    url: () => `/api/projects/${rp.projectId}/photos/${rp.sparePhotoId}`,
    foreign: () => `/api/projects/${rp.foreignProjectId}/photos/${rp.foreignPhotoId}`,
    denied: 'owner',
    allowed: 'surveyor',
    success: 200,
  },
  'GET /api/projects/[projectId]/photos/[photoId]/original': {
    url: () => `/api/projects/${rp.projectId}/photos/${rp.photoId}/original`,
    foreign: () => `/api/projects/${rp.foreignProjectId}/photos/${rp.foreignPhotoId}/original`,
    denied: ALL_ROLES,
    allowed: 'owner',
    success: 200,
  },
  'GET /api/projects/[projectId]/photos/[photoId]/thumbnail': {
    url: () => `/api/projects/${rp.projectId}/photos/${rp.photoId}/thumbnail`,
    foreign: () => `/api/projects/${rp.foreignProjectId}/photos/${rp.foreignPhotoId}/thumbnail`,
    denied: ALL_ROLES,
    allowed: 'maintenance',
    success: 200,
  },
  // ---- end of road crossings and photos ----
  // ---- trench records: duct bundles, joints and catalogues (ducts helper) ----
  'GET /api/projects/[projectId]/duct-bundles': {
    url: () => `/api/projects/${dp.projectId}/duct-bundles`,
    foreign: () => `/api/projects/${dp.foreignProjectId}/duct-bundles`,
    denied: ALL_ROLES,
    allowed: 'owner',
    success: 200,
  },
  'POST /api/projects/[projectId]/duct-bundles': {
    url: () => `/api/projects/${dp.projectId}/duct-bundles`,
    foreign: () => `/api/projects/${dp.foreignProjectId}/duct-bundles`,
    denied: 'owner',
    allowed: 'surveyor',
    body: () => ductBundleBody(dp.routeId, 100, 150),
    success: 201,
  },
  'GET /api/projects/[projectId]/duct-bundles/[bundleId]': {
    url: () => `/api/projects/${dp.projectId}/duct-bundles/${dp.bundleId}`,
    foreign: () => `/api/projects/${dp.foreignProjectId}/duct-bundles/${dp.foreignBundleId}`,
    denied: ALL_ROLES,
    allowed: 'maintenance',
    success: 200,
  },
  'PATCH /api/projects/[projectId]/duct-bundles/[bundleId]': {
    url: () => `/api/projects/${dp.projectId}/duct-bundles/${dp.bundleId}`,
    foreign: () => `/api/projects/${dp.foreignProjectId}/duct-bundles/${dp.foreignBundleId}`,
    denied: 'owner',
    allowed: 'engineer',
    body: () => ductBundleBody(dp.routeId, 0, 55),
    success: 200,
  },
  'DELETE /api/projects/[projectId]/duct-bundles/[bundleId]': {
    url: () => `/api/projects/${dp.projectId}/duct-bundles/${dp.spareBundleId}`,
    foreign: () => `/api/projects/${dp.foreignProjectId}/duct-bundles/${dp.foreignBundleId}`,
    denied: 'maintenance',
    allowed: 'surveyor',
    success: 200,
  },
  'POST /api/projects/[projectId]/duct-bundles/planned': {
    url: () => `/api/projects/${dp.projectId}/duct-bundles/planned`,
    foreign: () => `/api/projects/${dp.foreignProjectId}/duct-bundles/planned`,
    denied: 'owner',
    allowed: 'engineer',
    success: 200,
  },
  'GET /api/projects/[projectId]/duct-joints': {
    url: () => `/api/projects/${dp.projectId}/duct-joints`,
    foreign: () => `/api/projects/${dp.foreignProjectId}/duct-joints`,
    denied: ALL_ROLES,
    allowed: 'maintenance',
    success: 200,
  },
  'POST /api/projects/[projectId]/duct-joints': {
    url: () => `/api/projects/${dp.projectId}/duct-joints`,
    foreign: () => `/api/projects/${dp.foreignProjectId}/duct-joints`,
    denied: 'owner',
    allowed: 'surveyor',
    body: () => ({ routeId: dp.routeId, chainageM: 55, kind: 'connector', ductPositions: [1, 2] }),
    success: 201,
  },
  'DELETE /api/projects/[projectId]/duct-joints/[jointId]': {
    url: () => `/api/projects/${dp.projectId}/duct-joints/${dp.spareJointId}`,
    foreign: () => `/api/projects/${dp.foreignProjectId}/duct-joints/${dp.foreignJointId}`,
    denied: 'owner',
    allowed: 'engineer',
    success: 200,
  },
  'GET /api/projects/[projectId]/duct-continuity': {
    url: () => `/api/projects/${dp.projectId}/duct-continuity`,
    foreign: () => `/api/projects/${dp.foreignProjectId}/duct-continuity`,
    denied: ALL_ROLES,
    allowed: 'owner',
    success: 200,
  },
  'GET /api/projects/[projectId]/catalogues': {
    url: () => `/api/projects/${dp.projectId}/catalogues`,
    foreign: () => `/api/projects/${dp.foreignProjectId}/catalogues`,
    denied: ALL_ROLES,
    allowed: 'maintenance',
    success: 200,
  },
  'POST /api/projects/[projectId]/catalogues/duct-sizes': {
    url: () => `/api/projects/${dp.projectId}/catalogues/duct-sizes`,
    foreign: () => `/api/projects/${dp.foreignProjectId}/catalogues/duct-sizes`,
    denied: 'surveyor',
    allowed: 'engineer',
    body: () => ({ outerMm: 9, innerMm: 6.5 }),
    success: 201,
  },
  'PATCH /api/projects/[projectId]/catalogues/duct-sizes/[sizeId]': {
    url: () => `/api/projects/${dp.projectId}/catalogues/duct-sizes/${dp.sizeId}`,
    foreign: () => `/api/projects/${dp.foreignProjectId}/catalogues/duct-sizes/${dp.foreignSizeId}`,
    denied: 'surveyor',
    allowed: 'contractorAdmin',
    body: () => ({ common: true }),
    success: 200,
  },
  'POST /api/projects/[projectId]/catalogues/colour-sequences': {
    url: () => `/api/projects/${dp.projectId}/catalogues/colour-sequences`,
    foreign: () => `/api/projects/${dp.foreignProjectId}/catalogues/colour-sequences`,
    denied: 'surveyor',
    allowed: 'engineer',
    body: () => ({ name: 'Matrix sequence', repeatMarking: 'tracer', colours: [{ name: 'red', hex: '#d22b2b' }, { name: 'green', hex: '#1e8c3a' }] }),
    success: 201,
  },
  'POST /api/projects/[projectId]/catalogues/utility-kinds': {
    url: () => `/api/projects/${dp.projectId}/catalogues/utility-kinds`,
    foreign: () => `/api/projects/${dp.foreignProjectId}/catalogues/utility-kinds`,
    denied: 'surveyor',
    allowed: 'contractorAdmin',
    body: () => ({ key: 'matrix_kind', label: 'Matrix kind' }),
    success: 201,
  },
  'PATCH /api/projects/[projectId]/catalogues/utility-kinds/[kindId]': {
    url: () => `/api/projects/${dp.projectId}/catalogues/utility-kinds/${dp.kindId}`,
    foreign: () => `/api/projects/${dp.foreignProjectId}/catalogues/utility-kinds/${dp.foreignKindId}`,
    denied: 'owner',
    allowed: 'engineer',
    body: () => ({ label: 'Other (matrix)' }),
    success: 200,
  },
  'POST /api/projects/[projectId]/catalogues/backfill-materials': {
    url: () => `/api/projects/${dp.projectId}/catalogues/backfill-materials`,
    foreign: () => `/api/projects/${dp.foreignProjectId}/catalogues/backfill-materials`,
    denied: 'maintenance',
    allowed: 'engineer',
    body: () => ({ label: 'Matrix sand' }),
    success: 201,
  },
  'PATCH /api/projects/[projectId]/catalogues/backfill-materials/[materialId]': {
    url: () => `/api/projects/${dp.projectId}/catalogues/backfill-materials/${dp.materialId}`,
    foreign: () => `/api/projects/${dp.foreignProjectId}/catalogues/backfill-materials/${dp.foreignMaterialId}`,
    denied: 'surveyor',
    allowed: 'engineer',
    body: () => ({ retired: true }),
    success: 200,
  },
  // ---- end of duct bundles, joints and catalogues ----
  // ---- trench records: surface restoration and daily production (restoration helper) ----
  'GET /api/projects/[projectId]/restorations': {
    url: () => `/api/projects/${sp.projectId}/restorations`,
    foreign: () => `/api/projects/${sp.foreignProjectId}/restorations`,
    denied: ALL_ROLES,
    allowed: 'maintenance',
    success: 200,
  },
  'POST /api/projects/[projectId]/restorations': {
    url: () => `/api/projects/${sp.projectId}/restorations`,
    foreign: () => `/api/projects/${sp.foreignProjectId}/restorations`,
    denied: 'owner',
    allowed: 'surveyor',
    body: () => ({ routeId: sp.routeId, fromChainageM: 100, toChainageM: 150, restoredAt: '2026-11-03T10:00', temperatures: [{ tempC: 195 }] }),
    success: 201,
  },
  'PATCH /api/projects/[projectId]/restorations/[restorationId]': {
    url: () => `/api/projects/${sp.projectId}/restorations/${sp.restorationId}`,
    foreign: () => `/api/projects/${sp.foreignProjectId}/restorations/${sp.foreignRestorationId}`,
    denied: 'owner',
    allowed: 'engineer',
    body: () => ({ note: 'isolation matrix', temperatures: [{ tempC: 190 }] }),
    success: 200,
  },
  'DELETE /api/projects/[projectId]/restorations/[restorationId]': {
    url: () => `/api/projects/${sp.projectId}/restorations/${sp.spareRestorationId}`,
    foreign: () => `/api/projects/${sp.foreignProjectId}/restorations/${sp.foreignRestorationId}`,
    denied: 'maintenance',
    allowed: 'surveyor',
    success: 200,
  },
  'GET /api/projects/[projectId]/production': {
    url: () => `/api/projects/${sp.projectId}/production?from=2026-11-01&to=2026-11-30`,
    foreign: () => `/api/projects/${sp.foreignProjectId}/production`,
    denied: ALL_ROLES,
    allowed: 'owner',
    success: 200,
  },
  'POST /api/projects/[projectId]/production/corrections': {
    url: () => `/api/projects/${sp.projectId}/production/corrections`,
    foreign: () => `/api/projects/${sp.foreignProjectId}/production/corrections`,
    denied: 'owner',
    allowed: 'engineer',
    body: () => ({ day: '2026-11-03', crew: 'Matrix', quantity: 'laid_m', value: 42, reason: 'isolation matrix' }),
    success: 201,
  },
  'DELETE /api/projects/[projectId]/production/corrections/[correctionId]': {
    url: () => `/api/projects/${sp.projectId}/production/corrections/${sp.spareCorrectionId}`,
    foreign: () => `/api/projects/${sp.foreignProjectId}/production/corrections/${sp.foreignProductionCorrectionId}`,
    denied: 'maintenance',
    allowed: 'surveyor',
    success: 200,
  },
  // ---- end of surface restoration and daily production ----
  // ---- trench records: depth readings, test pits and utility crossings (depths helper) ----
  'GET /api/projects/[projectId]/depth-readings': { url: () => `/api/projects/${dx.projectId}/depth-readings`, foreign: () => `/api/projects/${dx.foreignProjectId}/depth-readings`, denied: ALL_ROLES, allowed: 'owner', success: 200 },
  'POST /api/projects/[projectId]/depth-readings': {
    url: () => `/api/projects/${dx.projectId}/depth-readings`,
    foreign: () => `/api/projects/${dx.foreignProjectId}/depth-readings`,
    denied: 'owner',
    allowed: 'surveyor',
    body: () => ({ routeId: dx.routeId, chainageM: 120, coverM: 0.45, trenchDepthM: 0.5 }),
    success: 201,
  },
  'PATCH /api/projects/[projectId]/depth-readings/[readingId]': {
    url: () => `/api/projects/${dx.projectId}/depth-readings/${dx.readingId}`,
    foreign: () => `/api/projects/${dx.foreignProjectId}/depth-readings/${dx.foreignReadingId}`,
    denied: 'owner',
    allowed: 'engineer',
    body: () => ({ coverM: 0.41 }),
    success: 200,
  },
  'DELETE /api/projects/[projectId]/depth-readings/[readingId]': {
    url: () => `/api/projects/${dx.projectId}/depth-readings/${dx.spareReadingId}`,
    foreign: () => `/api/projects/${dx.foreignProjectId}/depth-readings/${dx.foreignReadingId}`,
    denied: 'owner',
    allowed: 'surveyor',
    success: 200,
  },
  'POST /api/projects/[projectId]/depth-readings/import': {
    url: () => `/api/projects/${dx.projectId}/depth-readings/import`,
    foreign: () => `/api/projects/${dx.foreignProjectId}/depth-readings/import`,
    denied: 'owner',
    allowed: 'surveyor',
    body: () => ({ multipart: { file: { name: 'depths.csv', mimeType: 'text/csv', buffer: Buffer.from(`route,chainage,cover\n${dx.routeRef},140,0.44\n`) }, confirm: '1' } }),
    success: 201,
  },
  'POST /api/projects/[projectId]/depth-readings/from-upload/[uploadId]': {
    url: () => `/api/projects/${dx.projectId}/depth-readings/from-upload/${dx.uploadId}`,
    foreign: (c) => `/api/projects/${c.foreignProjectId}/depth-readings/from-upload/${c.foreignUploadId}`,
    denied: 'owner',
    allowed: 'surveyor',
    body: () => ({ attribute: 'depth' }),
    success: 201,
  },
  'GET /api/projects/[projectId]/test-pits': { url: () => `/api/projects/${dx.projectId}/test-pits`, foreign: () => `/api/projects/${dx.foreignProjectId}/test-pits`, denied: ALL_ROLES, allowed: 'maintenance', success: 200 },
  'POST /api/projects/[projectId]/test-pits': {
    url: () => `/api/projects/${dx.projectId}/test-pits`,
    foreign: () => `/api/projects/${dx.foreignProjectId}/test-pits`,
    denied: 'owner',
    allowed: 'surveyor',
    body: () => ({ routeId: dx.routeId, chainageM: 90, name: 'TP-M', method: 'hand_dug', dugOn: '2026-11-02' }),
    success: 201,
  },
  'PATCH /api/projects/[projectId]/test-pits/[pitId]': {
    url: () => `/api/projects/${dx.projectId}/test-pits/${dx.pitId}`,
    foreign: () => `/api/projects/${dx.foreignProjectId}/test-pits/${dx.foreignPitId}`,
    denied: 'owner',
    allowed: 'engineer',
    body: () => ({ depthM: 0.8 }),
    success: 200,
  },
  'DELETE /api/projects/[projectId]/test-pits/[pitId]': {
    url: () => `/api/projects/${dx.projectId}/test-pits/${dx.sparePitId}`,
    foreign: () => `/api/projects/${dx.foreignProjectId}/test-pits/${dx.foreignPitId}`,
    denied: 'owner',
    allowed: 'surveyor',
    success: 200,
  },
  'POST /api/projects/[projectId]/test-pits/from-upload/[uploadId]': {
    url: () => `/api/projects/${dx.projectId}/test-pits/from-upload/${dx.uploadId}`,
    foreign: (c) => `/api/projects/${c.foreignProjectId}/test-pits/from-upload/${c.foreignUploadId}`,
    denied: 'owner',
    allowed: 'surveyor',
    body: () => ({ code: 'PIT' }),
    success: 201,
  },
  'GET /api/projects/[projectId]/utility-crossings': { url: () => `/api/projects/${dx.projectId}/utility-crossings`, foreign: () => `/api/projects/${dx.foreignProjectId}/utility-crossings`, denied: ALL_ROLES, allowed: 'owner', success: 200 },
  'POST /api/projects/[projectId]/utility-crossings': {
    url: () => `/api/projects/${dx.projectId}/utility-crossings`,
    foreign: () => `/api/projects/${dx.foreignProjectId}/utility-crossings`,
    denied: 'owner',
    allowed: 'surveyor',
    body: () => ({ routeId: dx.routeId, chainageM: 95, utilityKindId: dx.kindId, method: 'gpr', depthM: 0.7, clearanceM: 0.2 }),
    success: 201,
  },
  'PATCH /api/projects/[projectId]/utility-crossings/[crossingId]': {
    url: () => `/api/projects/${dx.projectId}/utility-crossings/${dx.crossingId}`,
    foreign: () => `/api/projects/${dx.foreignProjectId}/utility-crossings/${dx.foreignCrossingId}`,
    denied: 'owner',
    allowed: 'engineer',
    body: () => ({ clearanceM: 0.35 }),
    success: 200,
  },
  'DELETE /api/projects/[projectId]/utility-crossings/[crossingId]': {
    url: () => `/api/projects/${dx.projectId}/utility-crossings/${dx.spareCrossingId}`,
    foreign: () => `/api/projects/${dx.foreignProjectId}/utility-crossings/${dx.foreignCrossingId}`,
    denied: 'owner',
    allowed: 'surveyor',
    success: 200,
  },
  // ---- end of depth readings, test pits and utility crossings ----
  // ---- households: the address register's import (helper A) ----
  'POST /api/projects/[projectId]/addresses': {
    url: () => `/api/projects/${ap.projectId}/addresses`,
    foreign: () => `/api/projects/${ap.foreignProjectId}/addresses`,
    denied: 'surveyor',
    // the owner's admin may import the register too (no contractor-side restriction)
    allowed: 'admin',
    body: () => addressForm(`M-${Date.now()}`),
    success: 201,
  },
  // helper C: the register's list and exports, read by every role of the project
  'GET /api/projects/[projectId]/addresses': {
    url: () => `/api/projects/${ap.projectId}/addresses?format=csv`,
    foreign: () => `/api/projects/${ap.foreignProjectId}/addresses`,
    denied: ALL_ROLES,
    allowed: 'maintenance',
    success: 200,
  },
  'GET /api/projects/[projectId]/address-imports': {
    url: () => `/api/projects/${ap.projectId}/address-imports`,
    foreign: () => `/api/projects/${ap.foreignProjectId}/address-imports`,
    denied: ALL_ROLES,
    allowed: 'maintenance',
    success: 200,
  },
  'GET /api/address-imports/[importId]/original': {
    url: () => `/api/address-imports/${ap.importId}/original`,
    foreign: () => `/api/address-imports/${ap.foreignImportId}/original`,
    denied: ALL_ROLES,
    allowed: 'owner',
    success: 200,
  },
  // ---- end of the address register's import ----
  // ---- households: drops recorded as installed and the daily series (helper B) ----
  'PATCH /api/projects/[projectId]/addresses/[addressId]': {
    url: () => `/api/projects/${ap.dropsProjectId}/addresses/${ap.addressId}`,
    foreign: () => `/api/projects/${ap.foreignProjectId}/addresses/${ap.foreignAddressId}`,
    // the network owner's people read the drops, the contractor's record them
    denied: 'owner',
    allowed: 'surveyor',
    body: () => ({ connected: true, connectedOn: '2026-12-01' }),
    success: 200,
  },
  'GET /api/projects/[projectId]/progress': {
    url: () => `/api/projects/${ap.projectId}/progress`,
    foreign: () => `/api/projects/${ap.foreignProjectId}/progress`,
    denied: ALL_ROLES,
    allowed: 'maintenance',
    success: 200,
  },
  // ---- end of households passed ----
  // ---- handover review and answers (helper E2) ----
  'GET /api/projects/[projectId]/handovers': {
    url: () => `/api/projects/${hv.projectId}/handovers`,
    foreign: () => `/api/projects/${hv.foreignProjectId}/handovers`,
    denied: ALL_ROLES,
    allowed: 'maintenance',
    success: 200,
  },
  'POST /api/handovers/[handoverId]/review': {
    url: () => `/api/handovers/${hv.issuedId}/review`,
    foreign: () => `/api/handovers/${hv.foreignId}/review`,
    // the contractor's engineer builds, never reviews (and the owner's maintenance role has no review right)
    denied: 'engineer',
    allowed: 'owner',
    body: () => ({ decision: 'accept' }),
    success: 200,
  },
  'POST /api/handovers/[handoverId]/answers': {
    url: () => `/api/handovers/${hv.returnedId}/answers`,
    foreign: () => `/api/handovers/${hv.foreignId}/answers`,
    denied: 'surveyor',
    allowed: 'engineer',
    body: () => ({ answers: [{ commentId: hv.commentId, text: 'isolation matrix' }] }),
    success: 201,
  },
  // ---- end of handover review and answers ----
  // ---- handover packages: build, status, download (helper E1) ----
  'POST /api/projects/[projectId]/handovers': {
    url: () => `/api/projects/${hv.projectId}/handovers`,
    foreign: () => `/api/projects/${hv.foreignProjectId}/handovers`,
    // the contractor's engineers and admins build; the owner's people and surveyors do not
    denied: 'surveyor',
    allowed: 'engineer',
    body: () => ({ scope: {}, note: 'isolation matrix' }),
    success: 202,
  },
  'GET /api/handovers/[handoverId]': {
    url: () => `/api/handovers/${hv.issuedId}`,
    foreign: () => `/api/handovers/${hv.foreignId}`,
    denied: ALL_ROLES,
    allowed: 'maintenance',
    success: 200,
  },
  'GET /api/handovers/[handoverId]/download': {
    url: () => `/api/handovers/${hv.issuedId}/download`,
    foreign: () => `/api/handovers/${hv.foreignId}/download`,
    denied: ALL_ROLES,
    allowed: 'owner',
    success: 200,
  },
  // ---- end of handover packages ----
  'GET /api/crs': { url: () => '/api/crs?q=25832', foreign: NO_OBJECT, denied: ALL_ROLES, allowed: 'surveyor', success: 200 },
  'GET /api/audit': { url: () => '/api/audit', foreign: NO_OBJECT, denied: 'maintenance', allowed: 'admin', success: 200 },
};

let formSeq = 0;
/** A small, always-new GPX as a multipart form. */
function gpxForm() {
  formSeq += 1;
  return { multipart: { file: { name: 'matrix.gpx', mimeType: 'application/gpx+xml', buffer: Buffer.from(gpxTrack(5, { seed: Date.now() % 1e6 + formSeq })) } } };
}

function listRoutes(): string[] {
  const root = path.resolve(__dirname, '../../app/api');
  const out: string[] = [];
  const walk = (dir: string) => {
    for (const name of readdirSync(dir)) {
      const full = path.join(dir, name);
      if (statSync(full).isDirectory()) walk(full);
      else if (name === 'route.ts') {
        const src = readFileSync(full, 'utf8');
        const route = '/api/' + path.relative(root, dir).split(path.sep).join('/');
        const methods = new Set<string>();
        for (const m of src.matchAll(/export\s+(?:const|async function)\s+(GET|POST|PUT|PATCH|DELETE)\b/g)) methods.add(m[1]);
        // export lists, e.g. `export { handler as GET, POST }`
        for (const m of src.matchAll(/export\s*\{([^}]*)\}/g)) {
          for (const part of m[1].split(',')) {
            const name = part.trim().split(/\s+as\s+/).pop() ?? '';
            if (/^(GET|POST|PUT|PATCH|DELETE)$/.test(name)) methods.add(name);
          }
        }
        for (const m of methods) out.push(`${m} ${route}`);
      }
    }
  };
  walk(root);
  return out.sort();
}

// ---- trench records: road crossings and photos (helper) ----
interface RecordsCtx {
  projectId: string;
  foreignProjectId: string;
  at: (east: number, north: number) => [number, number];
  /** a crossing route without a record, for the POST row */
  freeCrossingRouteId: string;
  crossingId: string;
  spareCrossingId: string;
  foreignCrossingId: string;
  photoId: string;
  sparePhotoId: string;
  foreignPhotoId: string;
  /** bytes no photo of the project has yet, for the POST row */
  newPhoto: Buffer;
}
let rp: RecordsCtx;
/** A photo placed by hand (lon/lat), as the phone's form sends it. */
function photoForm(bytes: Buffer, [lon, lat]: [number, number]) {
  return { multipart: { file: { name: 'matrix.png', mimeType: 'image/png', buffer: bytes }, lon: String(lon), lat: String(lat), caption: 'isolation matrix' } };
}
// ---- trench records: duct bundles, joints and catalogues (ducts helper) ----
interface DuctsCtx {
  projectId: string;
  foreignProjectId: string;
  /** the street route of the project, 200 m */
  routeId: string;
  bundleId: string;
  spareBundleId: string;
  foreignBundleId: string;
  spareJointId: string;
  foreignJointId: string;
  sizeId: string;
  foreignSizeId: string;
  kindId: string;
  foreignKindId: string;
  materialId: string;
  foreignMaterialId: string;
}
let dp: DuctsCtx;
/** An installed bundle of two custom 7/4 mm ducts, as the form sends it. */
const ductBundleBody = (routeId: string, from: number, to: number) => ({
  routeId,
  fromChainageM: from,
  toChainageM: to,
  ducts: [
    { outerMm: 7, innerMm: 4, colourPosition: 1, purpose: 'feeder' },
    { outerMm: 7, innerMm: 4, colourPosition: 2, purpose: 'spare' },
  ],
  tracerWire: true,
  warningTape: true,
  protectiveFill: false,
});
// ---- end of duct bundles, joints and catalogues ----

// ---- trench records: surface restoration and daily production (restoration helper) ----
interface RestorationCtx {
  projectId: string;
  foreignProjectId: string;
  /** the project's 200 m street route */
  routeId: string;
  restorationId: string;
  spareRestorationId: string;
  foreignRestorationId: string;
  spareCorrectionId: string;
  foreignProductionCorrectionId: string;
}
let sp: RestorationCtx;
// ---- end of surface restoration and daily production ----

// ---- trench records: depth readings, test pits and utility crossings (depths helper) ----
interface DepthsCtx {
  projectId: string;
  foreignProjectId: string;
  routeId: string;
  routeRef: string;
  readingId: string;
  spareReadingId: string;
  foreignReadingId: string;
  pitId: string;
  sparePitId: string;
  foreignPitId: string;
  crossingId: string;
  spareCrossingId: string;
  foreignCrossingId: string;
  kindId: string;
  /** an upload of points with a depth attribute and a pit code */
  uploadId: string;
}
let dx: DepthsCtx;
// ---- end of depth readings, test pits and utility crossings ----

// ---- households: the address register's import (helper A) ----
interface AddressImportCtx {
  /** a project between the demo owner and contractor, so the demo's own register is left alone */
  projectId: string;
  foreignProjectId: string;
  importId: string;
  foreignImportId: string;
  /** a project of its own and an address of each register (helper B: the drop recorded as installed) */
  dropsProjectId: string;
  addressId: string;
  foreignAddressId: string;
}
let ap: AddressImportCtx;
/** A one-address register as a CSV form, in Quillhaven's part of the map. */
const addressForm = (key: string) => ({
  multipart: { file: { name: 'register.csv', mimeType: 'text/csv', buffer: Buffer.from(`key,street,number,lon,lat\n${key},Matrix Lane,${Date.now() % 1000},9.2001,52.2001\n`) } },
});
// ---- end of the address register's import ----

// ---- handover review and answers (helper E2) ----
interface HandoverCtx {
  /** a project between the demo owner and contractor, so the demo's own handovers are left alone */
  projectId: string;
  foreignProjectId: string;
  /** an issued revision (to accept), a returned one with the owner's comment commentId (to answer), one of Mossgate's */
  issuedId: string;
  returnedId: string;
  commentId: number;
  foreignId: string;
}
let hv: HandoverCtx;
// ---- end of handover review and answers ----

let ctx: Ctx;

test.beforeAll(async ({ request }) => {
  const tokens = {} as Record<Who, string>;
  const demo: Record<Who, { email: string; role: string; org: string; orgKind: 'owner' | 'contractor' }> = {
    admin: { email: DEMO.admin, role: 'admin', org: 'Quillhaven Open Fibre', orgKind: 'owner' },
    owner: { email: DEMO.owner, role: 'owner', org: 'Quillhaven Open Fibre', orgKind: 'owner' },
    maintenance: { email: DEMO.maintenance, role: 'maintenance', org: 'Quillhaven Open Fibre', orgKind: 'owner' },
    contractorAdmin: { email: DEMO.contractorAdmin, role: 'admin', org: 'Tarnwick Slot & Duct Ltd', orgKind: 'contractor' },
    engineer: { email: DEMO.engineer, role: 'engineer', org: 'Tarnwick Slot & Duct Ltd', orgKind: 'contractor' },
    surveyor: { email: DEMO.surveyor, role: 'surveyor', org: 'Tarnwick Slot & Duct Ltd', orgKind: 'contractor' },
  };
  const names: Record<Who, string> = {
    admin: 'Maren Oakfield', owner: 'Tobiah Wrenlow', maintenance: 'Edda Corrigal',
    contractorAdmin: 'Ilse Marrowby', engineer: 'Osric Fennimore', surveyor: 'Pia Halloway',
  };
  for (const w of Object.keys(demo) as Who[]) tokens[w] = addUserWithToken({ ...demo[w], name: names[w] });
  const foreignToken = addUserWithToken({ email: 'admin@mossgate-coop.example', name: 'Foreign Admin', role: 'admin', org: 'Mossgate Fibre Cooperative', orgKind: 'owner' });

  const projects = await json<{ projects: { id: string; name: string }[] }>(request, 'GET', '/api/projects', tokens.admin);
  const projectId = projects.body!.projects.find((p) => p.name === 'Quillhaven North, phase 1')!.id;
  // partners are picked from registered organisations: register them (201), or find them from an earlier attempt (409)
  const register = async (token: string, name: string, kind: 'owner' | 'contractor') => {
    const r = await json(request, 'POST', '/api/organisations', token, { name, kind });
    expect([201, 409]).toContain(r.status);
    const list = await json<{ organisations: { id: string; name: string }[] }>(request, 'GET', `/api/organisations?kind=${kind}`, token);
    return list.body!.organisations.find((o) => o.name === name)!.id;
  };
  await register(foreignToken, 'Larkspur Ground Works', 'contractor');
  const fp = await json<{ project: { id: string } }>(request, 'POST', '/api/projects', foreignToken, { name: `Mossgate ${Date.now()}`, partnerOrganisation: 'Larkspur Ground Works' });
  expect(fp.status).toBe(201);
  const newOwnerOrgId = await register(tokens.admin, 'Fernbrook Fibre Trust', 'owner');
  const tarnwickId = await register(tokens.admin, 'Tarnwick Slot & Duct Ltd', 'contractor');
  const between = async (label: string) =>
    (await json<{ project: { id: string } }>(request, 'POST', '/api/projects', tokens.admin, { name: `${label} ${Date.now()}`, partnerOrganisationId: tarnwickId })).body!.project.id;
  const transferProjectId = await between('Matrix transfer');
  const proposeProjectId = await between('Matrix proposal');
  const propose = async (token: string, pid: string, body: unknown) => {
    const r = await json<{ change: { id: number } }>(request, 'POST', `/api/projects/${pid}/org-changes`, token, body);
    expect(r.status).toBe(201);
    return r.body!.change.id;
  };
  const orgChangeId = await propose(tokens.contractorAdmin, transferProjectId, { side: 'owner', organisationId: newOwnerOrgId, reason: 'isolation matrix' });
  const foreignOrgChangeId = await propose(foreignToken, fp.body!.project.id, { side: 'contractor', organisationId: tarnwickId, reason: 'isolation matrix' });
  const job = await json<{ job: { id: string } }>(request, 'POST', `/api/projects/${projectId}/audit/exports`, tokens.admin);
  const fjob = await json<{ job: { id: string } }>(request, 'POST', `/api/projects/${fp.body!.project.id}/audit/exports`, foreignToken);
  const fme = await json<{ user: { id: string } }>(request, 'GET', '/api/me', foreignToken);
  const spare = await json<{ user: { id: string } }>(request, 'POST', '/api/users', tokens.admin, { email: `spare-${Date.now()}@test.example`, name: 'Spare Person', role: 'owner' });
  const ftok = await json<{ token: { id: string } }>(request, 'POST', '/api/tokens', foreignToken, { name: 'foreign' });
  const up = async (token: string, pid: string, form: unknown) => json<{ upload?: { id: string }; error?: { details: { uploadId: string } } }>(request, 'POST', `/api/projects/${pid}/uploads`, token, form);
  const upload = await up(tokens.surveyor, projectId, gpxForm());
  const spareUpload = await up(tokens.surveyor, projectId, gpxForm());
  const foreignUpload = await up(foreignToken, fp.body!.project.id, gpxForm());
  const csv = `pt,easting,northing\n1,507200.0,5773400.0\n2,507201.0,5773401.${Date.now() % 1000}\n`;
  const failed = await up(tokens.surveyor, projectId, { multipart: { file: { name: 'no-crs.csv', mimeType: 'text/csv', buffer: Buffer.from(csv) } } });
  expect([upload.status, spareUpload.status, foreignUpload.status, failed.status]).toEqual([201, 201, 201, 422]);
  // a plan and a reconciliation run on both sides, so that there are sections to ask about
  // unique bytes each time: Playwright runs this hook again in a fresh worker after a failure
  const designForm = (ref: string) => ({ multipart: { file: { name: 'd.geojson', mimeType: 'application/geo+json', buffer: Buffer.from(JSON.stringify({ type: 'Feature', properties: { ref }, geometry: { type: 'LineString', coordinates: [[9.105, 52.105], [9.1055, 52.1052]] } })) } } });
  expect((await json(request, 'POST', `/api/projects/${projectId}/planned`, tokens.engineer, designForm(`ISO-${Date.now()}`))).status).toBe(201);
  expect((await json(request, 'POST', `/api/projects/${fp.body!.project.id}/planned`, foreignToken, designForm(`ISO-F-${Date.now()}`))).status).toBe(201);
  const sectionsOf = async (pid: string, token: string) => {
    const job = await json<{ job: { id: string } }>(request, 'POST', `/api/projects/${pid}/reconcile`, token);
    await expect.poll(async () => (await json<{ job: { status: string } }>(request, 'GET', `/api/jobs/${job.body!.job.id}`, token)).body!.job.status, { timeout: 30_000 }).toBe('completed');
    return (await json<{ sections: { id: string }[] }>(request, 'GET', `/api/projects/${pid}/sections`, token)).body!.sections;
  };
  expect((await sectionsOf(projectId, tokens.engineer)).length).toBeGreaterThan(0);
  const foreignSections = await sectionsOf(fp.body!.project.id, foreignToken);
  // earlier rows' uploads queue reconciliations that may retire sections: run one to its end first
  const currentSection = async (req: APIRequestContext) => {
    const job = await json<{ job: { id: string } }>(req, 'POST', `/api/projects/${projectId}/reconcile`, tokens.engineer);
    await expect.poll(async () => (await json<{ job: { status: string } }>(req, 'GET', `/api/jobs/${job.body!.job.id}`, tokens.engineer)).body!.job.status, { timeout: 30_000 }).toBe('completed');
    return (await json<{ sections: SectionRef[] }>(req, 'GET', `/api/projects/${projectId}/sections`, tokens.engineer)).body!.sections[0];
  };
  const correctionOn = async (section: SectionRef, token: string) => {
    const r = await json<{ correction: { id: number } }>(request, 'POST', `/api/sections/${section.id}/corrections`, token, correctionFor(section));
    expect(r.status).toBe(202);
    return r.body!.correction.id;
  };
  const correctionId = await correctionOn(await currentSection(request), tokens.engineer);
  const foreignCorrectionId = await correctionOn((foreignSections as unknown as SectionRef[])[0], foreignToken);
  const exclusionOn = async (pid: string, uploadId: string, token: string) => {
    const r = await json<{ exclusion: { id: number } }>(request, 'POST', `/api/projects/${pid}/uploads/${uploadId}/exclusions`, token, { kind: 'distance', from: 0, to: 2, reason: 'isolation matrix' });
    expect(r.status).toBe(201);
    return r.body!.exclusion.id;
  };
  const exclusionId = await exclusionOn(projectId, upload.body!.upload!.id, tokens.engineer);
  const foreignExclusionId = await exclusionOn(fp.body!.project.id, foreignUpload.body!.upload!.id, foreignToken);
  // ---- trench records: road crossings and photos (helper) ----
  // a project between the demo owner and contractor with one street and three road crossings, and one of
  // Mossgate's with Larkspur (its contractor) recording there; new each run, so nothing is left from a retry
  {
    const at = (e: number, n: number): [number, number] => [9.2 + e / 68_300, 52.2 + n / 111_250];
    const design = (tag: string) => {
      const line = (ref: string, type: string, pts: [number, number][]) => ({ type: 'Feature', properties: { route_id: `${tag}-${ref}`, type }, geometry: { type: 'LineString', coordinates: pts.map(([e, n]) => at(e, n)) } });
      const features = [line('S', 'street', [[0, 0], [200, 0]]), line('X1', 'road crossing', [[40, 0], [40, -9]]), line('X2', 'road crossing', [[90, 0], [90, -9]]), line('X3', 'road crossing', [[150, 0], [150, -9]])];
      return { multipart: { file: { name: 'crossings.geojson', mimeType: 'application/geo+json', buffer: Buffer.from(JSON.stringify({ type: 'FeatureCollection', features })) } } };
    };
    const stamp = Date.now();
    const larkspur = addUserWithToken({ email: 'surveyor@larkspur-ground.example', name: 'Larkspur Surveyor', role: 'surveyor', org: 'Larkspur Ground Works', orgKind: 'contractor' });
    const project = async (token: string, body: unknown) => {
      const r = await json<{ project: { id: string } }>(request, 'POST', '/api/projects', token, body);
      expect(r.status).toBe(201);
      return r.body!.project.id;
    };
    const mine = await project(tokens.admin, { name: `Matrix records ${stamp}`, partnerOrganisationId: tarnwickId });
    const theirs = await project(foreignToken, { name: `Mossgate records ${stamp}`, partnerOrganisation: 'Larkspur Ground Works' });
    expect((await json(request, 'POST', `/api/projects/${mine}/planned`, tokens.engineer, design(`RC${stamp}`))).status).toBe(201);
    expect((await json(request, 'POST', `/api/projects/${theirs}/planned`, foreignToken, design(`RF${stamp}`))).status).toBe(201);
    const crossingRoutes = async (pid: string, token: string) =>
      (await json<{ crossings: { routeId: string; routeRef: string }[] }>(request, 'GET', `/api/projects/${pid}/road-crossings`, token)).body!.crossings.map((c) => c.routeId);
    const [x1, x2, x3] = await crossingRoutes(mine, tokens.surveyor);
    const [fx1] = await crossingRoutes(theirs, larkspur);
    const crossing = async (pid: string, token: string, routeId: string) => {
      const r = await json<{ crossing: { id: string } }>(request, 'POST', `/api/projects/${pid}/road-crossings`, token, { routeId, built: true });
      expect(r.status).toBe(201);
      return r.body!.crossing.id;
    };
    let shade = stamp % 200;
    const png = async () => {
      shade += 1;
      return sharp({ create: { width: 32, height: 24, channels: 3, background: { r: shade % 256, g: (shade * 7) % 256, b: (shade * 13) % 256 } } }).png().toBuffer();
    };
    const photo = async (pid: string, token: string, p: [number, number]) => {
      const r = await json<{ photo: { id: string } }>(request, 'POST', `/api/projects/${pid}/photos`, token, photoForm(await png(), p));
      expect(r.status).toBe(201);
      return r.body!.photo.id;
    };
    rp = {
      projectId: mine,
      foreignProjectId: theirs,
      at,
      freeCrossingRouteId: x3,
      crossingId: await crossing(mine, tokens.surveyor, x1),
      spareCrossingId: await crossing(mine, tokens.surveyor, x2),
      foreignCrossingId: await crossing(theirs, larkspur, fx1),
      photoId: await photo(mine, tokens.surveyor, at(60, 1)),
      sparePhotoId: await photo(mine, tokens.surveyor, at(80, -1)),
      foreignPhotoId: await photo(theirs, larkspur, at(60, 1)),
      newPhoto: await png(),
    };
  }
  // ---- trench records: duct bundles, joints and catalogues (ducts helper) ----
  // a project between the demo owner and contractor with one 200 m street, and one of Mossgate's with
  // Larkspur (its contractor) recording there; new each run
  {
    const stamp = Date.now();
    const at = (e: number): [number, number] => [9.25 + e / 68_300, 52.21];
    const design = (ref: string) => ({ multipart: { file: { name: 'ducts.geojson', mimeType: 'application/geo+json', buffer: Buffer.from(JSON.stringify({ type: 'Feature', properties: { ref, ducts: '2x7/4' }, geometry: { type: 'LineString', coordinates: [at(0), at(200)] } })) }, mapping: JSON.stringify({ ref: 'ref', ducts: 'ducts' }) } });
    const larkspur = addUserWithToken({ email: 'engineer@larkspur-ground.example', name: 'Larkspur Engineer', role: 'engineer', org: 'Larkspur Ground Works', orgKind: 'contractor' });
    const project = async (token: string, body: unknown) => {
      const r = await json<{ project: { id: string } }>(request, 'POST', '/api/projects', token, body);
      expect(r.status).toBe(201);
      return r.body!.project.id;
    };
    const mine = await project(tokens.admin, { name: `Matrix ducts ${stamp}`, partnerOrganisationId: tarnwickId });
    const theirs = await project(foreignToken, { name: `Mossgate ducts ${stamp}`, partnerOrganisation: 'Larkspur Ground Works' });
    expect((await json(request, 'POST', `/api/projects/${mine}/planned`, tokens.engineer, design(`DB${stamp}`))).status).toBe(201);
    expect((await json(request, 'POST', `/api/projects/${theirs}/planned`, foreignToken, design(`DF${stamp}`))).status).toBe(201);
    const catalogues = async (pid: string, token: string) =>
      (await json<{ ductSizes: { id: string }[]; utilityKinds: { id: string; key: string }[]; backfillMaterials: { id: string }[] }>(request, 'GET', `/api/projects/${pid}/catalogues`, token)).body!;
    const bundle = async (pid: string, token: string, routeId: string, from: number, to: number) => {
      const r = await json<{ bundle: { id: string } }>(request, 'POST', `/api/projects/${pid}/duct-bundles`, token, ductBundleBody(routeId, from, to));
      expect(r.status).toBe(201);
      return r.body!.bundle.id;
    };
    const joint = async (pid: string, token: string, routeId: string) => {
      const r = await json<{ joint: { id: string } }>(request, 'POST', `/api/projects/${pid}/duct-joints`, token, { routeId, chainageM: 20, kind: 'joint', ductPositions: [1] });
      expect(r.status).toBe(201);
      return r.body!.joint.id;
    };
    // the route ids come with the derived planned bundles
    const plannedRoute = async (pid: string, token: string) => {
      expect((await json(request, 'POST', `/api/projects/${pid}/duct-bundles/planned`, token)).status).toBe(200);
      return (await json<{ bundles: { routeId: string }[] }>(request, 'GET', `/api/projects/${pid}/duct-bundles?kind=planned`, token)).body!.bundles[0].routeId;
    };
    const routeId = await plannedRoute(mine, tokens.engineer);
    const foreignRouteId = await plannedRoute(theirs, larkspur);
    const [cm, cf] = [await catalogues(mine, tokens.engineer), await catalogues(theirs, larkspur)];
    dp = {
      projectId: mine,
      foreignProjectId: theirs,
      routeId,
      bundleId: await bundle(mine, tokens.surveyor, routeId, 0, 50),
      spareBundleId: await bundle(mine, tokens.surveyor, routeId, 160, 200),
      foreignBundleId: await bundle(theirs, larkspur, foreignRouteId, 0, 50),
      spareJointId: await joint(mine, tokens.surveyor, routeId),
      foreignJointId: await joint(theirs, larkspur, foreignRouteId),
      sizeId: cm.ductSizes[0].id,
      foreignSizeId: cf.ductSizes[0].id,
      kindId: cm.utilityKinds.find((k) => k.key === 'other')!.id,
      foreignKindId: cf.utilityKinds[0].id,
      materialId: cm.backfillMaterials[0].id,
      foreignMaterialId: cf.backfillMaterials[0].id,
    };
  }
  // ---- trench records: surface restoration and daily production (restoration helper) ----
  // on the ducts helper's projects (one street of 200 m each), with a Larkspur surveyor recording on theirs
  {
    const larkspur = addUserWithToken({ email: 'restoration@larkspur-ground.example', name: 'Larkspur Restorer', role: 'surveyor', org: 'Larkspur Ground Works', orgKind: 'contractor' });
    const foreignRouteId = (await json<{ bundles: { routeId: string }[] }>(request, 'GET', `/api/projects/${dp.foreignProjectId}/duct-bundles?kind=planned`, larkspur)).body!.bundles[0].routeId;
    const restoration = async (pid: string, token: string, routeId: string, from: number, to: number) => {
      const r = await json<{ restoration: { id: string } }>(request, 'POST', `/api/projects/${pid}/restorations`, token, { routeId, fromChainageM: from, toChainageM: to, restoredAt: '2026-11-03T10:00', temperatures: [{ tempC: 196 }] });
      expect(r.status).toBe(201);
      return r.body!.restoration.id;
    };
    const correction = async (pid: string, token: string) => {
      const r = await json<{ correction: { id: string } }>(request, 'POST', `/api/projects/${pid}/production/corrections`, token, { day: '2026-11-03', quantity: 'sawn_m', value: 10, reason: 'isolation matrix' });
      expect(r.status).toBe(201);
      return r.body!.correction.id;
    };
    sp = {
      projectId: dp.projectId,
      foreignProjectId: dp.foreignProjectId,
      routeId: dp.routeId,
      restorationId: await restoration(dp.projectId, tokens.surveyor, dp.routeId, 0, 50),
      spareRestorationId: await restoration(dp.projectId, tokens.surveyor, dp.routeId, 50, 100),
      foreignRestorationId: await restoration(dp.foreignProjectId, larkspur, foreignRouteId, 0, 50),
      spareCorrectionId: await correction(dp.projectId, tokens.surveyor),
      foreignProductionCorrectionId: await correction(dp.foreignProjectId, larkspur),
    };
  }
  // ---- end of surface restoration and daily production ----
  // ---- trench records: depth readings, test pits and utility crossings (depths helper) ----
  // on the ducts helper's projects (one street of 200 m each), with a Larkspur surveyor recording on theirs
  {
    const larkspur = addUserWithToken({ email: 'depths@larkspur-ground.example', name: 'Larkspur Depths', role: 'surveyor', org: 'Larkspur Ground Works', orgKind: 'contractor' });
    const foreignRouteId = (await json<{ bundles: { routeId: string }[] }>(request, 'GET', `/api/projects/${dp.foreignProjectId}/duct-bundles?kind=planned`, larkspur)).body!.bundles[0].routeId;
    const post = async (pid: string, token: string, kind: string, body: unknown) => {
      const r = await json<Record<string, { id: string }>>(request, 'POST', `/api/projects/${pid}/${kind}`, token, body);
      expect(r.status, `${kind} ${JSON.stringify(r.body)}`).toBe(201);
      return r.body!;
    };
    const reading = async (pid: string, token: string, routeId: string, chainageM: number) => (await post(pid, token, 'depth-readings', { routeId, chainageM, coverM: 0.45 })).reading.id;
    const pit = async (pid: string, token: string, routeId: string, chainageM: number) => (await post(pid, token, 'test-pits', { routeId, chainageM, method: 'hand_dug' })).pit.id;
    const kinds = async (pid: string, token: string) => (await json<{ utilityKinds: { id: string; key: string }[] }>(request, 'GET', `/api/projects/${pid}/catalogues`, token)).body!.utilityKinds;
    const [kindId, foreignKindId] = [(await kinds(dp.projectId, tokens.engineer)).find((k) => k.key === 'gas')!.id, (await kinds(dp.foreignProjectId, larkspur))[0].id];
    const crossing = async (pid: string, token: string, routeId: string, utilityKindId: string, chainageM: number) =>
      (await post(pid, token, 'utility-crossings', { routeId, chainageM, utilityKindId, method: 'gpr', clearanceM: 0.4 })).crossing.id;
    const at = (e: number): [number, number] => [9.25 + e / 68_300, 52.21];
    const points = { type: 'FeatureCollection', features: [
      { type: 'Feature', properties: { name: 'PIT 1', code: 'PIT', depth: 0.46, stamp: Date.now() }, geometry: { type: 'Point', coordinates: at(150) } },
      { type: 'Feature', properties: { name: 'S2', code: 'EDGE', depth: 0.43 }, geometry: { type: 'Point', coordinates: at(160) } },
    ] };
    const up = await json<{ upload: { id: string } }>(request, 'POST', `/api/projects/${dp.projectId}/uploads`, tokens.surveyor, { multipart: { file: { name: 'depth-shots.geojson', mimeType: 'application/geo+json', buffer: Buffer.from(JSON.stringify(points)) } } });
    expect(up.status).toBe(201);
    const readingId = await reading(dp.projectId, tokens.surveyor, dp.routeId, 10);
    const ref = (await json<{ readings: { id: string; routeRef: string }[] }>(request, 'GET', `/api/projects/${dp.projectId}/depth-readings`, tokens.engineer)).body!.readings.find((r) => r.id === readingId)!.routeRef;
    dx = {
      projectId: dp.projectId,
      foreignProjectId: dp.foreignProjectId,
      routeId: dp.routeId,
      routeRef: ref,
      readingId,
      spareReadingId: await reading(dp.projectId, tokens.surveyor, dp.routeId, 20),
      foreignReadingId: await reading(dp.foreignProjectId, larkspur, foreignRouteId, 10),
      pitId: await pit(dp.projectId, tokens.surveyor, dp.routeId, 30),
      sparePitId: await pit(dp.projectId, tokens.surveyor, dp.routeId, 40),
      foreignPitId: await pit(dp.foreignProjectId, larkspur, foreignRouteId, 30),
      crossingId: await crossing(dp.projectId, tokens.surveyor, dp.routeId, kindId, 50),
      spareCrossingId: await crossing(dp.projectId, tokens.surveyor, dp.routeId, kindId, 60),
      foreignCrossingId: await crossing(dp.foreignProjectId, larkspur, foreignRouteId, foreignKindId, 50),
      kindId,
      uploadId: up.body!.upload.id,
    };
  }
  // ---- end of depth readings, test pits and utility crossings ----
  // ---- households: the address register's import (helper A) ----
  {
    const stamp = Date.now();
    const mine = await json<{ project: { id: string } }>(request, 'POST', '/api/projects', tokens.admin, { name: `Matrix addresses ${stamp}`, partnerOrganisationId: tarnwickId });
    const theirs = await json<{ project: { id: string } }>(request, 'POST', '/api/projects', foreignToken, { name: `Mossgate addresses ${stamp}`, partnerOrganisation: 'Larkspur Ground Works' });
    expect([mine.status, theirs.status]).toEqual([201, 201]);
    const imported = async (pid: string, token: string) => {
      const r = await json<{ import: { id: string } }>(request, 'POST', `/api/projects/${pid}/addresses`, token, addressForm(`A-${stamp}`));
      expect(r.status).toBe(201);
      return r.body!.import.id;
    };
    ap = {
      projectId: mine.body!.project.id,
      foreignProjectId: theirs.body!.project.id,
      importId: await imported(mine.body!.project.id, tokens.engineer),
      foreignImportId: await imported(theirs.body!.project.id, foreignToken),
      dropsProjectId: '',
      addressId: '',
      foreignAddressId: '',
    };
    const firstAddress = async (pid: string, token: string) => {
      const r = await json<{ addresses: { id: string }[] }>(request, 'GET', `/api/projects/${pid}/addresses`, token);
      expect(r.status).toBe(200);
      return r.body!.addresses[0].id;
    };
    // its own project: the matrix's import row replaces the register of ap.projectId, removing this address
    const drops = await json<{ project: { id: string } }>(request, 'POST', '/api/projects', tokens.admin, { name: `Matrix drops ${stamp}`, partnerOrganisationId: tarnwickId });
    expect(drops.status).toBe(201);
    await imported(drops.body!.project.id, tokens.engineer);
    ap.dropsProjectId = drops.body!.project.id;
    ap.addressId = await firstAddress(ap.dropsProjectId, tokens.engineer);
    ap.foreignAddressId = await firstAddress(ap.foreignProjectId, foreignToken);
  }
  // ---- end of the address register's import ----
  // ---- handover review and answers (helper E2): revisions as an issued build leaves them (test fixture) ----
  {
    const mine = await between('Matrix handover');
    const returnedId = issuedHandoverFixture(mine);
    const ret = await json(request, 'POST', `/api/handovers/${returnedId}/review`, tokens.owner, { decision: 'return', comments: [{ text: 'isolation matrix' }] });
    expect(ret.status).toBe(200);
    const list = await json<{ handovers: { id: string; comments: { id: number }[] }[] }>(request, 'GET', `/api/projects/${mine}/handovers`, tokens.engineer);
    hv = {
      projectId: mine,
      foreignProjectId: fp.body!.project.id,
      returnedId,
      commentId: list.body!.handovers.find((h) => h.id === returnedId)!.comments[0].id,
      issuedId: issuedHandoverFixture(mine),
      foreignId: issuedHandoverFixture(fp.body!.project.id),
    };
    // the build route needs an approved section in the project (helper E1)
    approvedSectionFixture(mine);
  }
  // ---- end of handover review and answers ----
  ctx = {
    currentSection,
    correctionId,
    foreignCorrectionId,
    exclusionId,
    foreignExclusionId,
    foreignSectionId: foreignSections[0].id,
    uploadId: upload.body!.upload!.id,
    spareUploadId: spareUpload.body!.upload!.id,
    foreignUploadId: foreignUpload.body!.upload!.id,
    failedUploadId: failed.body!.error!.details.uploadId,
    tokens,
    foreignToken,
    projectId,
    foreignProjectId: fp.body!.project.id,
    transferProjectId,
    proposeProjectId,
    orgChangeId,
    foreignOrgChangeId,
    newOwnerOrgId,
    jobId: job.body!.job.id,
    foreignJobId: fjob.body!.job.id,
    foreignUserId: fme.body!.user.id,
    spareUserId: spare.body!.user.id,
    foreignTokenId: ftok.body!.token.id,
    spareTokenId: async (req) => (await json<{ token: { id: string } }>(req, 'POST', '/api/tokens', tokens.engineer, { name: 'spare' })).body!.token.id,
  };
  // the result route needs a finished job
  await expect
    .poll(async () => (await json<{ job: { status: string } }>(request, 'GET', `/api/jobs/${ctx.jobId}`, tokens.admin)).body!.job.status, { timeout: 20_000 })
    .toBe('completed');
});

test('every API route and method has a row in the matrix', () => {
  expect(listRoutes()).toEqual(Object.keys(MATRIX).sort());
});

for (const [key, row] of Object.entries(MATRIX)) {
  test(`isolation: ${key}`, async ({ request }) => {
    if ('public' in row) {
      await row.check(request);
      return;
    }
    const method = key.split(' ')[0];
    let url = row.url(ctx);
    if (url.endsWith('/SPARE')) url = url.replace('SPARE', await ctx.spareTokenId(request));
    const section = url.includes('/CURRENT') || row.current ? await ctx.currentSection(request) : undefined;
    if (section) url = url.replace('CURRENT', section.id);
    const body = row.body?.(ctx, section);

    const anon = await json<{ error: { code: string } }>(request, method, url, null, body);
    expect(anon.status, 'without credentials').toBe(401);
    expect(anon.body!.error.code).toBe('unauthenticated');

    if (typeof row.foreign === 'function') {
      const r = await json<{ error: { code: string } }>(request, method, row.foreign(ctx), ctx.tokens[row.allowed], body);
      expect(r.status, 'another organisation’s object').toBe(404);
      expect(r.body!.error.code).toBe('not_found');
    } else {
      expect(row.foreign.na.length).toBeGreaterThan(10);
    }

    if (typeof row.denied === 'string') {
      const r = await json<{ error: { code: string } }>(request, method, url, ctx.tokens[row.denied], body);
      expect(r.status, `role ${row.denied}`).toBe(403);
      expect(r.body!.error.code).toBe('forbidden');
    } else {
      expect(row.denied.na.length).toBeGreaterThan(10);
    }

    const ok = await json(request, method, url, ctx.tokens[row.allowed], body);
    expect(ok.status, `role ${row.allowed}`).toBe(row.success);
    if (row.emptyForOthers) {
      const key = row.emptyForOthers.key;
      expect((ok.body as Record<string, unknown[]>)[key].length, `${key} for ${row.allowed}`).toBeGreaterThan(0);
      const theirs = await json<Record<string, unknown[]>>(request, method, url, ctx.foreignToken, body);
      expect(theirs.status, 'another organisation').toBe(200);
      expect(theirs.body![key], 'another organisation sees nothing').toEqual([]);
    }
  });
}
