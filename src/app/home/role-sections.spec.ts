import { sectionsFor } from './role-sections';

describe('sectionsFor', () => {
  it('gives one section per role held, in the fixed role order', () => {
    expect(sectionsFor(new Set(['student', 'admin'])).map((s) => s.role)).toEqual(['admin', 'student']);
  });

  it('links admins to users and settings, and the others to the quick check', () => {
    const [admin] = sectionsFor(new Set(['admin']));
    expect(admin.links.map((l) => l.link)).toEqual(['/admin/users', '/admin/settings']);
    const [technician] = sectionsFor(new Set(['technician']));
    expect(technician.links.map((l) => l.link)).toContain('/calc');
    expect(sectionsFor(new Set())).toEqual([]);
  });
});
