import { navItemsFor } from './nav';

describe('navItemsFor', () => {
  it('shows the admin pages only to admins', () => {
    const admin = navItemsFor(true, new Set(['admin'])).map((i) => i.link);
    const technician = navItemsFor(true, new Set(['technician'])).map((i) => i.link);
    expect(admin).toContain('/admin/users');
    expect(technician).not.toContain('/admin/users');
    expect(technician).toEqual(['/home', '/sets', '/templates', '/meters', '/calc']);
  });

  it('shows the template library to every signed-in user, never to a visitor', () => {
    for (const role of ['admin', 'author', 'technician', 'instructor', 'student'] as const) {
      expect(navItemsFor(true, new Set([role])).map((i) => i.link)).toContain('/templates');
    }
    expect(navItemsFor(false, new Set()).map((i) => i.link)).not.toContain('/templates');
  });

  it('shows Classes to instructors, students and admins, never to a technician or author only', () => {
    for (const role of ['instructor', 'student', 'admin'] as const) {
      expect(navItemsFor(true, new Set([role])).map((i) => i.link)).toContain('/classes');
    }
    for (const role of ['technician', 'author'] as const) {
      expect(navItemsFor(true, new Set([role])).map((i) => i.link)).not.toContain('/classes');
    }
  });

  it('shows a visitor only the public quick check', () => {
    expect(navItemsFor(false, new Set()).map((i) => i.link)).toEqual(['/calc']);
  });
});
