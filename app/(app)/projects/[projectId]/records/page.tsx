import type { Metadata } from 'next';
import Link from 'next/link';
import { requireProjectPage } from '@/lib/auth/page-guards';
import { can } from '@/lib/auth/roles';
import { Card, PageHeader } from '@/components/ui/primitives';

export const metadata: Metadata = { title: 'Trench records' };

/** What lies in the trench, one kind of record a page. */
const KINDS = [
  { slug: 'ducts', title: 'Duct bundles', text: 'Ducts laid per stretch: sizes, colours, positions and purposes against the design; joints and continuity.' },
  { slug: 'depths', title: 'Depth readings', text: 'Cover and trench depth at a chainage or a GNSS point, typed or imported, against the minimum cover.' },
  { slug: 'crossings', title: 'Road crossings', text: 'The short cuts across the street to the houses, sawn before the lengthways cut.' },
  { slug: 'pits', title: 'Test pits and utilities', text: 'Hand-dug pits and utilities found by radar or in a pit, with their clearance to our ducts.' },
  { slug: 'photos', title: 'Photos', text: 'Photos placed from their GPS position or by hand, attached to a stretch, a crossing or a pit.' },
  { slug: 'restoration', title: 'Surface restoration', text: 'Backfill, compaction, cleaning and hot bituminous surface with its laying temperatures.' },
  { slug: 'production', title: 'Daily production', text: 'Metres sawn, laid, backfilled and restored per crew and day, crossings and pits.' },
] as const;

export default async function RecordsPage({ params }: { params: Promise<{ projectId: string }> }) {
  const { projectId } = await params;
  const { me, project } = await requireProjectPage(projectId, 'record.read');
  const base = `/projects/${project.id}`;
  return (
    <>
      <PageHeader title="Trench records" subtitle="What was laid, how deep, what else is in the ground, and how the road was put back." />
      <ul className="grid gap-4 sm:grid-cols-2 lg:grid-cols-3">
        {KINDS.map((k) => (
          <li key={k.slug}>
            <Card title={<Link href={`${base}/records/${k.slug}`}>{k.title}</Link>}>
              <p className="text-sm text-ink-soft">{k.text}</p>
            </Card>
          </li>
        ))}
        <li>
          <Card title={<Link href={`${base}/checks`}>Quality checks</Link>}>
            <p className="text-sm text-ink-soft">Every check of the records with its count and links to what fails.</p>
          </Card>
        </li>
        {can(me.role, 'catalogue.manage') && (
          <li>
            <Card title={<Link href={`${base}/records/catalogues`}>Catalogues</Link>}>
              <p className="text-sm text-ink-soft">Duct sizes, colour sequences, utility kinds and backfill materials of this project.</p>
            </Card>
          </li>
        )}
      </ul>
    </>
  );
}
