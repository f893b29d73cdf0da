import { describe, expect, it } from 'vitest';
import { can, canSeeProject, PERMISSIONS, ROLES } from '@/lib/auth/roles';
import { navigationFor } from '@/lib/auth/navigation';

describe('roles and visibility', () => {
  it('gives admin-only rights to admins alone', () => {
    for (const action of ['project.manage', 'user.manage', 'audit.read', 'audit.export'] as const) {
      expect(ROLES.filter((r) => can(r, action))).toEqual(['admin']);
    }
  });

  it('lets every role read projects it can see', () => {
    expect(ROLES.every((r) => can(r, 'project.read'))).toBe(true);
    expect(Object.keys(PERMISSIONS).length).toBeGreaterThan(4);
  });

  it('shows a project to its owner and contractor organisations only', () => {
    const p = { ownerOrgId: 'o', contractorOrgId: 'c' };
    expect(canSeeProject('o', p)).toBe(true);
    expect(canSeeProject('c', p)).toBe(true);
    expect(canSeeProject('x', p)).toBe(false);
  });

  it('gives admins their own navigation', () => {
    expect(navigationFor('admin').map((i) => i.label)).toContain('People');
    expect(navigationFor('surveyor').map((i) => i.label)).not.toContain('People');
  });
});
