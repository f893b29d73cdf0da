import type { Knex } from 'knex';
import type { Project } from '@/db/projects';
import { listDepthReadingsOnSection } from '@/db/depth-readings';
import { listDuctBundlesOnSection } from '@/db/duct-bundles';
import { listPhotosOnSection } from '@/db/photos';
import { listRestorationsOnSection } from '@/db/restorations';
import { listRoadCrossingsOnSection } from '@/db/road-crossings';
import { listTestPitsOnSection, listUtilityCrossingsOnSection } from '@/db/test-pits';
import { sectionFindings } from './quality-checks';

type SectionStretch = { projectId: string; plannedRouteRef: string | null; fromChainageM: number; toChainageM: number };

/**
 * Everything recorded on a section's stretch: records anchor on the route and chainage, so one whose
 * stretch lies in two sections shows in both, and each run's new cut of the sections finds them again.
 */
export async function sectionRecords(db: Knex, section: SectionStretch) {
  const [ductBundles, depthReadings, roadCrossings, testPits, utilityCrossings, photos, restorations] = await Promise.all([
    listDuctBundlesOnSection(db, section),
    listDepthReadingsOnSection(db, section),
    listRoadCrossingsOnSection(db, section),
    listTestPitsOnSection(db, section),
    listUtilityCrossingsOnSection(db, section),
    listPhotosOnSection(db, section),
    listRestorationsOnSection(db, section),
  ]);
  return { ductBundles, depthReadings, roadCrossings, testPits, utilityCrossings, photos, restorations };
}
export type SectionRecords = Awaited<ReturnType<typeof sectionRecords>>;

/** The records and the open quality checks of a section, as its page and API show them. */
export async function sectionRecordsAndChecks(db: Knex, project: Project, section: SectionStretch) {
  const [records, openChecks] = await Promise.all([sectionRecords(db, section), sectionFindings(db, project, section)]);
  return { records, openChecks };
}
