import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import { clearAuthStorage, nextRequest, sessionFor } from '../../../testing/http-testing';
import { Auth } from '../../core/auth/auth';
import { authToken } from '../../core/http/auth-token';
import { httpErrors } from '../../core/http/http-errors';
import { TemplateDiff } from '../templates-api';
import { sampleDocument, view } from '../testing/template-fixtures';
import { VersionDiff, versionRefOf } from './version-diff';

describe('VersionDiff', () => {
  let fixture: ComponentFixture<VersionDiff>;
  let http: HttpTestingController;
  const doc = sampleDocument();
  const [r1, r2, c1] = doc.components;
  const [, tpR2, tpChart] = doc.testPoints;

  const DIFF: TemplateDiff = {
    templateId: 11,
    from: 1,
    to: 2,
    components: {
      added: [{ key: 'c-r3', label: 'R3', after: { ...r1, key: 'c-r3', ref: 'R3', nodes: ['V1.2', 'chassis'], nominal: { ohms: 4700, text: '4k7' } } }],
      removed: [{ key: 'c-c1', label: 'C1', before: c1 }],
      changed: [{ key: 'c-r2', label: 'R2', before: r2, after: { ...r2, tolerancePct: 5, nominal: { ohms: 220000, text: '220k' } }, fields: ['nominal', 'tolerancePct'] }],
    },
    testPoints: {
      added: [],
      removed: [{ key: 'tp-r2', label: 'check of R2', before: tpR2 }],
      changed: [{ key: 'tp-v1p', label: 'V1.7 to B+1', before: tpChart, after: { ...tpChart, tolerancePct: 10 } as typeof tpChart, fields: ['tolerancePct', 'order'] }],
    },
    chassis: [],
    stages: { added: [], removed: [], changed: [] },
  };

  beforeEach(async () => {
    clearAuthStorage();
    TestBed.configureTestingModule({
      providers: [provideRouter([]), provideHttpClient(withInterceptors([httpErrors, authToken])), provideHttpClientTesting()],
    });
    http = TestBed.inject(HttpTestingController);
    TestBed.inject(Auth).begin(sessionFor(['technician'], 1, 8));
    fixture = TestBed.createComponent(VersionDiff);
    fixture.componentRef.setInput('id', '11');
    fixture.componentRef.setInput('from', '1');
    fixture.componentRef.setInput('to', '2');
    await fixture.whenStable();
    (await nextRequest(http, '/api/templates/11')).flush(view());
  });

  afterEach(() => {
    http.verify();
    clearAuthStorage();
  });

  const norm = (t: string | null | undefined) => (t ?? '').replace(/\s+/g, ' ').trim();
  const rows = (section: string) =>
    Array.from((fixture.nativeElement as HTMLElement).querySelectorAll(`section[aria-labelledby=${section}-title] li.row`)).map((li) => ({
      change: li.getAttribute('data-change'),
      mark: norm(li.querySelector('.mark')?.textContent),
      label: norm(li.querySelector('.what strong')?.textContent),
      fields: Array.from(li.querySelectorAll('.fields li')).map((f) => norm(f.textContent)),
    }));

  it('asks for the two versions and lists components added, removed and changed with a glyph and a word', async () => {
    const req = await nextRequest(http, (r) => r.url === '/api/templates/11/diff');
    expect(req.request.params.get('from')).toBe('1');
    expect(req.request.params.get('to')).toBe('2');
    req.flush(DIFF);
    await fixture.whenStable();
    const components = rows('co');
    expect(components.map((r) => r.change)).toEqual(['added', 'removed', 'changed']);
    // The icon's ligature name, the glyph and the word: never colour alone.
    expect(components.map((r) => r.mark)).toEqual(['add_circle+ added', 'remove_circle− removed', 'change_circle~ changed']);
    expect(components.map((r) => r.label)).toEqual(['R3', 'C1', 'R2']);
    expect(components[0].fields).toEqual([]);
    // Changed fields, old → new, with the values as a technician writes them.
    expect(components[2].fields).toEqual(['nominal: 250 kΩ → 220 kΩ', 'tolerancePct: 10 → 5']);
  });

  it('lists test points removed and changed, a move in bench order in words', async () => {
    (await nextRequest(http, (r) => r.url === '/api/templates/11/diff')).flush(DIFF);
    await fixture.whenStable();
    const points = rows('tp');
    expect(points.map((r) => r.change)).toEqual(['removed', 'changed']);
    expect(points[0].label).toBe('check of R2');
    expect(points[1].fields).toEqual(['tolerancePct: 20 → 10', 'order: moved in bench order']);
  });

  it('says so when the two versions do not differ', async () => {
    const none = { ...DIFF, components: { added: [], removed: [], changed: [] }, testPoints: { added: [], removed: [], changed: [] } };
    (await nextRequest(http, (r) => r.url === '/api/templates/11/diff')).flush(none);
    await fixture.whenStable();
    expect((fixture.nativeElement as HTMLElement).textContent).toContain('No differences');
    expect(rows('co')).toEqual([]);
  });
});

describe('versionRefOf', () => {
  it('reads a version number or draft, and nothing else', () => {
    expect(versionRefOf('3')).toBe(3);
    expect(versionRefOf('draft')).toBe('draft');
    expect(versionRefOf('0')).toBeNull();
    expect(versionRefOf('v2')).toBeNull();
    expect(versionRefOf(undefined)).toBeNull();
  });
});
