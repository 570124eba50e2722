// The app's sections (DESIGN.md §3 names) and who sees each in the navigation. Visibility follows
// the role table in shared/roles.ts; the server enforces the same table on every route.
import { can, type Permission, type Role } from '@/shared/roles';

export type SectionKey = 'watch' | 'alerts' | 'recordings' | 'trends' | 'transfer' | 'network' | 'people' | 'outbox';

export interface Section {
  key: SectionKey;
  /** Visible name and accessible name of the nav item — keep exactly as written (tests use them). */
  title: string;
  href: string;
  permission: Permission;
  /**
   * Whether the screen exists yet. Sections still to be built stay out of the navigation rather
   * than lead to an empty page; flip this when the screen lands.
   */
  built: boolean;
}

export const SECTIONS: readonly Section[] = [
  { key: 'watch', title: 'Watch', href: '/', permission: 'view', built: true },
  { key: 'alerts', title: 'Alerts', href: '/alerts', permission: 'view', built: true },
  { key: 'recordings', title: 'Recordings', href: '/recordings', permission: 'view', built: true },
  { key: 'trends', title: 'Trends', href: '/trends', permission: 'view', built: true },
  { key: 'transfer', title: 'Transfer study', href: '/transfer', permission: 'runStudy', built: true },
  { key: 'network', title: 'Network', href: '/network', permission: 'view', built: true },
  { key: 'people', title: 'People', href: '/people', permission: 'managePeople', built: true },
  { key: 'outbox', title: 'Outbox', href: '/outbox', permission: 'managePeople', built: true },
];

export function sectionsFor(role: Role | null | undefined): Section[] {
  return SECTIONS.filter((s) => s.built && can(role, s.permission));
}

/** The section a path belongs to ("/" only matches Watch exactly). */
export function activeSection(pathname: string, sections: readonly Section[]): SectionKey | null {
  let best: Section | null = null;
  for (const s of sections) {
    const match = s.href === '/' ? pathname === '/' : pathname === s.href || pathname.startsWith(`${s.href}/`);
    if (match && (!best || s.href.length > best.href.length)) best = s;
  }
  return best?.key ?? null;
}
