import { Anchor, CalendarDays, ClipboardCheck, Contact, Mail, ScrollText, Settings, Shapes, Sun, TriangleAlert, Users } from 'lucide-react';
import type { Role } from '../../shared/schemas/vocabulary';
import { paths } from '../lib/paths';

export interface NavItem {
  to: string;
  label: string;
  Icon: typeof Sun;
  roles: readonly Role[];
}

/** What each role sees in the navigation (PRODUCT.md §2). Reading is open to all; the list follows each role's day. */
export const navItems: NavItem[] = [
  { to: paths.today, label: 'Today', Icon: Sun, roles: ['owner', 'reception', 'instructor', 'rigger'] },
  { to: paths.schedule, label: 'Schedule', Icon: CalendarDays, roles: ['owner', 'reception', 'instructor', 'rigger'] },
  { to: paths.rig, label: 'Rig', Icon: Anchor, roles: ['owner', 'reception', 'instructor', 'rigger'] },
  { to: paths.inspections, label: 'Inspections', Icon: ClipboardCheck, roles: ['owner', 'rigger'] },
  { to: paths.faults, label: 'Faults', Icon: TriangleAlert, roles: ['owner', 'reception', 'instructor', 'rigger'] },
  { to: paths.students, label: 'Students', Icon: Contact, roles: ['owner', 'reception', 'instructor'] },
  { to: paths.classTypes, label: 'Class types', Icon: Shapes, roles: ['owner', 'reception'] },
  { to: paths.staff, label: 'Staff', Icon: Users, roles: ['owner', 'reception'] },
  { to: paths.settings, label: 'Settings', Icon: Settings, roles: ['owner'] },
  { to: paths.mailbox, label: 'Mailbox', Icon: Mail, roles: ['owner'] },
  { to: paths.audit, label: 'Audit', Icon: ScrollText, roles: ['owner'] },
];

export const navFor = (role: Role) => navItems.filter((i) => i.roles.includes(role));

export const roleLabel: Record<Role, string> = { owner: 'Owner', reception: 'Reception', instructor: 'Instructor', rigger: 'Rigger', student: 'Student' };
