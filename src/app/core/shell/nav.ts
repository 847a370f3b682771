import { Role } from '../auth/roles';

/** A toolbar link; shown only when the user holds one of `roles` (none listed: every signed-in user). */
export interface NavItem {
  readonly label: string;
  readonly icon: string;
  readonly link: string;
  readonly roles?: readonly Role[];
  /** Shown to signed-out visitors too. */
  readonly public?: boolean;
}

export const NAV_ITEMS: readonly NavItem[] = [
  { label: 'Home', icon: 'home', link: '/home' },
  { label: 'Sets', icon: 'radio', link: '/sets' },
  { label: 'Templates', icon: 'library_books', link: '/templates' },
  { label: 'Meters', icon: 'speed', link: '/meters' },
  { label: 'Classes', icon: 'school', link: '/classes', roles: ['instructor', 'student', 'admin'] },
  { label: 'Users', icon: 'group', link: '/admin/users', roles: ['admin'] },
  { label: 'Settings', icon: 'settings', link: '/admin/settings', roles: ['admin'] },
  { label: 'Quick check', icon: 'calculate', link: '/calc', public: true },
];

/** The items a visitor with these roles may use (the role guard refuses the others too). */
export function navItemsFor(signedIn: boolean, roles: ReadonlySet<Role>): NavItem[] {
  return NAV_ITEMS.filter((item) => {
    if (!signedIn) return item.public === true;
    return !item.roles || item.roles.some((r) => roles.has(r));
  });
}
