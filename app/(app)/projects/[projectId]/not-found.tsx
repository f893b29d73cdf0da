'use client';

import { usePathname } from 'next/navigation';
import { NotFoundPanel } from '@/components/ui/not-found-panel';

/** Inside a visible project: the upload, section or page asked for is not part of it. */
export default function ProjectNotFound() {
  const base = usePathname().split('/').slice(0, 3).join('/');
  return (
    <NotFoundPanel
      title="Not part of this project"
      links={[
        { href: base, label: 'Project overview' },
        { href: `${base}/uploads`, label: 'Uploads' },
        { href: `${base}/reconciliation`, label: 'Planned against built' },
      ]}
    >
      <p>The upload, section or page you asked for does not exist in this project. It may have been withdrawn, replaced or mistyped in the address.</p>
    </NotFoundPanel>
  );
}
