import { HttpTestingController } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatMenuHarness } from '@angular/material/menu/testing';
import type { NotificationList, NotificationRecord } from '@domain/class-format';
import { clearAuthStorage, nextRequest } from '../../../testing/http-testing';
import { Auth } from '../../core/auth/auth';
import { classBed, mountPage } from '../../classes/testing/class-bed';
import { NotificationBell, internalLink } from './notification-bell';

const note = (id: number, over: Partial<NotificationRecord> = {}): NotificationRecord => ({
  id,
  kind: 'submission',
  title: 'Tomas Brell submitted Wren 3: the audio stage',
  body: 'Attempt 1, after the due date',
  link: '/attempts/81/review',
  createdAt: '2030-04-02T10:00:00Z',
  readAt: null,
  ...over,
});
const list = (items: NotificationRecord[]): NotificationList => ({ items, unread: items.filter((i) => i.readAt === null).length });

describe('NotificationBell', () => {
  let http: HttpTestingController;
  let navigations: string[];

  beforeEach(() => ({ http, navigations } = classBed(['instructor'], 7)));
  afterEach(() => {
    http.verify();
    clearAuthStorage();
  });

  it('shows the unread count, marks one read when opened and goes to its link', async () => {
    const { fixture, loader, el } = await mountPage(NotificationBell);
    (await nextRequest(http, '/api/notifications')).flush(list([note(1), note(2, { kind: 'due-soon', title: 'Due in two days', link: '/assignments/41' }), note(3, { readAt: '2030-04-01T10:00:00Z', title: 'Old news' })]));
    await fixture.whenStable();
    expect(el.querySelector('.mat-badge-content')?.textContent?.trim()).toBe('2');
    expect(el.querySelector('button.bell')?.getAttribute('aria-label')).toBe('Notifications, 2 unread');

    const menu = await loader.getHarness(MatMenuHarness);
    await menu.open();
    (await nextRequest(http, '/api/notifications')).flush(list([note(1), note(2, { kind: 'due-soon', title: 'Due in two days', link: '/assignments/41' }), note(3, { readAt: '2030-04-01T10:00:00Z', title: 'Old news' })]));
    await fixture.whenStable();
    const items = await menu.getItems();
    expect(await items[0].getText()).toContain('New: Tomas Brell submitted');
    expect(await items[2].getText()).not.toContain('New:');
    await items[0].click();
    const req = await nextRequest(http, (r) => r.method === 'POST');
    expect(req.request.url).toBe('/api/notifications/1/read');
    req.flush({});
    await fixture.whenStable();
    expect(navigations).toContain('/attempts/81/review');
    expect(el.querySelector('button.bell')?.getAttribute('aria-label')).toBe('Notifications, 1 unread');
  });

  it('marks all read and hides the badge', async () => {
    const { fixture, loader, el } = await mountPage(NotificationBell);
    (await nextRequest(http, '/api/notifications')).flush(list([note(1), note(2)]));
    await fixture.whenStable();
    const menu = await loader.getHarness(MatMenuHarness);
    await menu.open();
    (await nextRequest(http, '/api/notifications')).flush(list([note(1), note(2)]));
    await fixture.whenStable();
    const all = await TestbedHarnessEnvironment.documentRootLoader(fixture).getHarness(MatButtonHarness.with({ text: 'Mark all read' }));
    await all.click();
    (await nextRequest(http, (r) => r.method === 'POST' && r.url === '/api/notifications/read-all')).flush({});
    await fixture.whenStable();
    expect(el.querySelector('button.bell')?.getAttribute('aria-label')).toBe('Notifications');
    expect(el.querySelector('.mat-badge-hidden')).not.toBeNull();
  });

  it('clears itself at sign-out', async () => {
    const { fixture, el } = await mountPage(NotificationBell);
    (await nextRequest(http, '/api/notifications')).flush(list([note(1)]));
    await fixture.whenStable();
    TestBed.inject(Auth).signOut();
    (await nextRequest(http, '/api/auth/sign-out')).flush(null, { status: 204, statusText: 'No Content' });
    await fixture.whenStable();
    expect(el.querySelector('button.bell')?.getAttribute('aria-label')).toBe('Notifications');
  });

  it('follows only links into this app', () => {
    expect(internalLink('/assignments/4')).toBe('/assignments/4');
    expect(internalLink('//evil.example/x')).toBeNull();
    expect(internalLink('https://evil.example/assignments/4')).toBeNull();
    expect(internalLink(`${location.origin}/attempts/9/review`)).toBe('/attempts/9/review');
  });
});
