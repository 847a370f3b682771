/** The roles of DESIGN.md §1; a user may hold several. */
export const ROLES = ['admin', 'author', 'technician', 'instructor', 'student'] as const;
export type Role = (typeof ROLES)[number];

/** Screen words for the roles. */
export const ROLE_LABELS: Readonly<Record<Role, string>> = {
  admin: 'Admin',
  author: 'Template author',
  technician: 'Technician',
  instructor: 'Instructor',
  student: 'Student',
};

export interface User {
  readonly id: number | string;
  readonly email: string;
  readonly name: string;
  readonly roles: readonly Role[];
}

/** What sign-in, sign-up, invitation accept and refresh answer. */
export interface Session {
  readonly accessToken: string;
  readonly refreshToken: string;
  readonly user: User;
}
