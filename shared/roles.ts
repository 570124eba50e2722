// Roles and what each may do: DESIGN.md §5.3 as data. The server enforces this table on every
// route (server/auth/allow.ts); the web client reads the same table only to hide actions a person
// may not take — hiding is a convenience, never the protection.
import { z } from 'zod';

export const ROLES = ['admin', 'engineer', 'operator', 'planner'] as const;
export type Role = (typeof ROLES)[number];
export const roleSchema = z.enum(ROLES, { error: `Role must be one of: ${ROLES.join(', ')}` });

export const ROLE_LABELS: Record<Role, string> = {
  admin: 'Administrator',
  engineer: 'Engineer',
  operator: 'Operator',
  planner: 'Planner',
};

/** One row of the role table: what the permission covers and which roles hold it. */
export interface PermissionRule {
  label: string;
  roles: readonly Role[];
}

export const PERMISSIONS = {
  view: {
    label: 'View Watch, Alerts, Trends, Fits, Recordings and the Network',
    roles: ['admin', 'engineer', 'operator', 'planner'],
  },
  acknowledgeAlert: {
    label: 'Acknowledge an alert',
    roles: ['admin', 'engineer', 'operator'],
  },
  runAnalysis: {
    label: 'Upload a recording, run a scan or a fit',
    roles: ['admin', 'engineer'],
  },
  editNetwork: {
    label: 'Edit the network and mode tracks',
    roles: ['admin', 'engineer'],
  },
  runStudy: {
    label: 'Run and save a transfer study',
    roles: ['admin', 'engineer', 'planner'],
  },
  managePeople: {
    label: 'Invite people, change roles, see the Outbox',
    roles: ['admin'],
  },
} as const satisfies Record<string, PermissionRule>;

export type Permission = keyof typeof PERMISSIONS;
export const PERMISSION_NAMES: readonly Permission[] = Object.freeze(Object.keys(PERMISSIONS) as Permission[]);
export const permissionSchema = z.enum(PERMISSION_NAMES as [Permission, ...Permission[]]);

/**
 * Who may call an endpoint: a permission from the table, any signed-in person ('signedIn'),
 * or anybody ('public': sign-in, CSRF token, invitation and password-reset links, health).
 */
export type Access = Permission | 'signedIn' | 'public';

export function can(role: Role | null | undefined, permission: Permission): boolean {
  if (!role) return false;
  return (PERMISSIONS[permission].roles as readonly Role[]).includes(role);
}

/** Whether a caller (null when anonymous) passes an endpoint's access rule. */
export function canAccess(role: Role | null | undefined, access: Access): boolean {
  if (access === 'public') return true;
  if (access === 'signedIn') return role != null;
  return can(role, access);
}

export function permissionsOf(role: Role): Permission[] {
  return PERMISSION_NAMES.filter((p) => can(role, p));
}
