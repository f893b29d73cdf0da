import type { Role } from './roles';

export interface NavItem {
  href: string;
  label: string;
}

/** What each role finds in the top navigation. Later capabilities add their entries here. */
export function navigationFor(role: Role): NavItem[] {
  const items: NavItem[] = [{ href: '/projects', label: 'Projects' }, { href: '/lookup', label: 'Duct lookup' }];
  if (role === 'admin') {
    items.push({ href: '/admin/users', label: 'People' }, { href: '/admin/activity', label: 'Activity' }, { href: '/admin/mail', label: 'E-mail' });
  }
  items.push({ href: '/account', label: 'Account' });
  return items;
}
