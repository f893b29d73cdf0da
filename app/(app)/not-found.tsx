import type { Metadata } from 'next';
import { NotFoundPanel } from '@/components/ui/not-found-panel';

export const metadata: Metadata = { title: 'Not found' };

export default function AppNotFound() {
  return (
    <NotFoundPanel title="This page could not be found" links={[{ href: '/projects', label: 'Your projects' }, { href: '/account', label: 'Your account' }]}>
      <p>
        The address may be mistyped, or the project belongs to an organisation yours does not work with. A project is shown only to its network
        owner and its contractor.
      </p>
    </NotFoundPanel>
  );
}
