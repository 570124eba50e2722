import { describe, expect, it } from 'vitest';
import { can, canAccess, PERMISSION_NAMES, PERMISSIONS, permissionsOf, ROLES, type Permission, type Role } from './roles';

// The role table of DESIGN.md §5.3, row by row (✓ = allowed), written out independently of roles.ts.
const DESIGN_TABLE: Record<Permission, Record<Role, boolean>> = {
  view: { admin: true, engineer: true, operator: true, planner: true },
  acknowledgeAlert: { admin: true, engineer: true, operator: true, planner: false },
  runAnalysis: { admin: true, engineer: true, operator: false, planner: false },
  editNetwork: { admin: true, engineer: true, operator: false, planner: false },
  runStudy: { admin: true, engineer: true, operator: false, planner: true },
  managePeople: { admin: true, engineer: false, operator: false, planner: false },
};

describe('role table', () => {
  it('has exactly the rows and roles of the design', () => {
    expect([...ROLES]).toEqual(['admin', 'engineer', 'operator', 'planner']);
    expect([...PERMISSION_NAMES].sort()).toEqual(Object.keys(DESIGN_TABLE).sort());
  });

  it.each(PERMISSION_NAMES.flatMap((p) => ROLES.map((r) => [p, r] as const)))('%s for %s', (permission, role) => {
    expect(can(role, permission)).toBe(DESIGN_TABLE[permission][role]);
  });

  it('permissionsOf lists what a role may do, in table order', () => {
    expect(permissionsOf('operator')).toEqual(['view', 'acknowledgeAlert']);
    expect(permissionsOf('planner')).toEqual(['view', 'runStudy']);
    expect(permissionsOf('admin')).toEqual(PERMISSION_NAMES);
  });

  it('access rules: public for anybody, signedIn for any role, a permission for its roles only', () => {
    expect(canAccess(null, 'public')).toBe(true);
    expect(canAccess(null, 'signedIn')).toBe(false);
    expect(canAccess('planner', 'signedIn')).toBe(true);
    expect(canAccess(null, 'view')).toBe(false);
    expect(canAccess('planner', 'editNetwork')).toBe(false);
    expect(canAccess('engineer', 'editNetwork')).toBe(true);
    expect(can(undefined, 'view')).toBe(false);
  });

  it('every row has a label for the UI', () => {
    for (const p of PERMISSION_NAMES) expect(PERMISSIONS[p].label.length).toBeGreaterThan(5);
  });
});
