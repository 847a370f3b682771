import { ROLES, Role } from '../core/auth/roles';

export interface RoleLink {
  readonly label: string;
  readonly link: string;
}

/** What one role does in Driftmark (DESIGN.md §1), shown on the home page. */
export interface RoleSection {
  readonly role: Role;
  readonly title: string;
  readonly summary: string;
  readonly tasks: readonly string[];
  readonly links: readonly RoleLink[];
}

const QUICK_CHECK: RoleLink = { label: 'Quick check a reading', link: '/calc' };

export const ROLE_SECTIONS: Readonly<Record<Role, RoleSection>> = {
  admin: {
    role: 'admin',
    title: 'Administration',
    summary: 'You manage the accounts of this Driftmark instance, their roles and its settings.',
    tasks: [
      'Invite people by email or create their account directly, with their roles',
      'Change roles, deactivate and reactivate accounts',
      'Open or close self sign-up for this instance',
    ],
    links: [
      { label: 'Users', link: '/admin/users' },
      { label: 'Instance settings', link: '/admin/settings' },
    ],
  },
  technician: {
    role: 'technician',
    title: 'At the bench',
    summary: 'Survey a set against its chassis template and see at once which parts are out.',
    tasks: [
      'Pick the chassis template and key readings stage by stage',
      'See which parts are out and which need a lifted lead to decide',
      'Get the replacement and recap list; record parts, lifted leads and safety gates',
      'Print the record and re-survey the set later to see what moved',
    ],
    links: [QUICK_CHECK],
  },
  author: {
    role: 'author',
    title: 'Chassis templates',
    summary: 'Build the expected values for a chassis model that technicians survey against.',
    tasks: [
      'Enter expected values from service data, colour bands or a known-good set',
      'Publish versions, share templates and accept corrections',
    ],
    links: [{ label: 'Template library', link: '/templates' }, { label: 'Tube types', link: '/templates/tube-types' }, QUICK_CHECK],
  },
  instructor: {
    role: 'instructor',
    title: 'Teaching',
    summary: 'Run a class on the survey procedure and check how your students measured.',
    tasks: [
      'Assign a chassis and keep a reference survey',
      "Review each student's readings, comment, return or accept, score",
      'Sign off competencies',
    ],
    links: [{ label: 'Classes', link: '/classes' }, QUICK_CHECK],
  },
  student: {
    role: 'student',
    title: 'Your assignments',
    summary: 'Do the surveys your instructor assigns and learn from the feedback.',
    tasks: ['Survey the assigned training set and submit it', 'Read the feedback and redo what was asked'],
    links: [{ label: 'Your classes and assignments', link: '/classes' }, { label: 'Your competencies', link: '/competencies' }, QUICK_CHECK],
  },
};

/** The sections for the roles held, in the fixed role order. */
export function sectionsFor(roles: ReadonlySet<Role>): RoleSection[] {
  return ROLES.filter((r) => roles.has(r)).map((r) => ROLE_SECTIONS[r]);
}
