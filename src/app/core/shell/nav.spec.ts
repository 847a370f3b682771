import { navItemsFor } from './nav';

describe('navItemsFor', () => {
  it('shows the admin pages only to admins', () => {
    const admin = navItemsFor(true, new Set(['admin'])).map((i) => i.link);
    const technician = navItemsFor(true, new Set(['technician'])).map((i) => i.link);
    expect(admin).toContain('/admin/users');
    expect(technician).not.toContain('/admin/users');
    expect(technician).toEqual(['/home', '/calc']);
  });

  it('shows a visitor only the public quick check', () => {
    expect(navItemsFor(false, new Set()).map((i) => i.link)).toEqual(['/calc']);
  });
});
