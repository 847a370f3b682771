import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatTableHarness } from '@angular/material/table/testing';
import { provideRouter } from '@angular/router';
import { clearAuthStorage, nextRequest, sessionFor } from '../../../testing/http-testing';
import { Auth } from '../../core/auth/auth';
import { authToken } from '../../core/http/auth-token';
import { httpErrors } from '../../core/http/http-errors';
import { AdminUser, UserPage } from '../admin-api';
import { UserList } from './user-list';

// Invented people on example.org addresses.
const MINE: AdminUser = { id: 7, email: 'ada.voss@example.org', name: 'Ada Voss', roles: ['admin'], active: true, createdAt: '2026-01-05T10:00:00Z' };
const BEA: AdminUser = {
  id: 8,
  email: 'bea.lindqvist@example.org',
  name: 'Bea Lindqvist',
  roles: ['technician', 'author'],
  active: true,
  createdAt: '2026-02-11T09:30:00Z',
};
const CAI: AdminUser = { id: 9, email: 'cai.oduya@example.org', name: 'Cai Oduya', roles: ['student'], active: false, createdAt: '2026-03-01T08:00:00Z' };

describe('UserList', () => {
  let fixture: ComponentFixture<UserList>;
  let loader: HarnessLoader;
  let http: HttpTestingController;

  const isUsers = (q: string | null, page: string) => (req: { url: string; params: { get(k: string): string | null } }) =>
    req.url === '/api/admin/users' && req.params.get('q') === q && req.params.get('page') === page;

  async function load(page: UserPage): Promise<void> {
    (await nextRequest(http, isUsers(null, '1'))).flush(page);
    await fixture.whenStable();
  }

  beforeEach(async () => {
    clearAuthStorage();
    TestBed.configureTestingModule({
      providers: [
        provideRouter([]),
        provideHttpClient(withInterceptors([httpErrors, authToken])),
        provideHttpClientTesting(),
      ],
    });
    http = TestBed.inject(HttpTestingController);
    TestBed.inject(Auth).begin(sessionFor(['admin'], 1, 7));
    fixture = TestBed.createComponent(UserList);
    loader = TestbedHarnessEnvironment.loader(fixture);
    await fixture.whenStable();
    http.expectOne('/api/admin/invitations').flush({
      items: [{ id: 3, email: 'dora.prell@example.org', roles: ['instructor'], expiresAt: '2026-12-08T12:00:00Z' }],
    });
  });

  afterEach(() => {
    http.verify();
    clearAuthStorage();
  });

  it('asks for the first page with the bearer token and shows one row per user, roles and status in words', async () => {
    const req = await nextRequest(http, isUsers(null, '1'));
    expect(req.request.params.get('pageSize')).toBe('25');
    expect(req.request.headers.get('Authorization')).toBe('Bearer access-1');
    req.flush({ items: [MINE, BEA, CAI], total: 3 });
    await fixture.whenStable();

    const table = await loader.getHarness(MatTableHarness);
    const rows = await table.getCellTextByColumnName();
    expect(rows['email'].text).toEqual([MINE.email, BEA.email, CAI.email]);
    expect(rows['roles'].text).toEqual(['Admin', 'Technician, Template author', 'Student']);
    expect(rows['status'].text.map((t) => t.replace(/^\S+\s+/, ''))).toEqual(['Active', 'Active', 'Deactivated']);
    expect((fixture.nativeElement as HTMLElement).textContent).toContain('dora.prell@example.org');
  });

  it('deactivates another user and shows the answer in the row', async () => {
    await load({ items: [MINE, BEA], total: 2 });
    await (await loader.getHarness(MatButtonHarness.with({ text: `Deactivate ${BEA.email}` }))).click();
    const patch = http.expectOne('/api/admin/users/8');
    expect(patch.request.method).toBe('PATCH');
    expect(patch.request.body).toEqual({ active: false });
    patch.flush({ ...BEA, active: false });
    await fixture.whenStable();

    const rows = await (await loader.getHarness(MatTableHarness)).getCellTextByColumnName();
    expect(rows['status'].text[1]).toContain('Deactivated');
    expect(await loader.getHarnessOrNull(MatButtonHarness.with({ text: `Reactivate ${BEA.email}` }))).not.toBeNull();
  });

  it('does not let the admin deactivate their own account', async () => {
    await load({ items: [MINE, BEA], total: 2 });
    expect(await (await loader.getHarness(MatButtonHarness.with({ text: `Deactivate ${MINE.email}` }))).isDisabled()).toBeTrue();
    expect(await (await loader.getHarness(MatButtonHarness.with({ text: `Deactivate ${BEA.email}` }))).isDisabled()).toBeFalse();
  });

  it('reactivates a deactivated user', async () => {
    await load({ items: [CAI], total: 1 });
    await (await loader.getHarness(MatButtonHarness.with({ text: `Reactivate ${CAI.email}` }))).click();
    const patch = http.expectOne('/api/admin/users/9');
    expect(patch.request.body).toEqual({ active: true });
    patch.flush({ ...CAI, active: true });
    await fixture.whenStable();
    const rows = await (await loader.getHarness(MatTableHarness)).getCellTextByColumnName();
    expect(rows['status'].text[0]).toContain('Active');
  });

  it('searches from the first page with what was typed', async () => {
    await load({ items: [MINE, BEA, CAI], total: 3 });
    await (await loader.getHarness(MatInputHarness.with({ selector: '[type=search]' }))).setValue('  lindqvist ');
    const req = await nextRequest(http, isUsers('lindqvist', '1'));
    req.flush({ items: [BEA], total: 1 });
    await fixture.whenStable();
    const rows = await (await loader.getHarness(MatTableHarness)).getCellTextByColumnName();
    expect(rows['email'].text).toEqual([BEA.email]);
  });
});
