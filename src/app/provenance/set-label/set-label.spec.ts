import { HttpTestingController } from '@angular/common/http/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { clearAuthStorage, nextRequest, nextTask } from '../../../testing/http-testing';
import { configureBed, mount } from '../../sets/testing/section-bed';
import { ADA, setDetail } from '../../sets/testing/set-fixtures';
import { qrDataUrl, qrSvg } from './qr';
import { SetLabel } from './set-label';

const URL_ = 'https://radio.example.org/p/abcdefghijklmnopqrstuvwxyz012345';

describe('qr', () => {
  it('encodes the link as an SVG and as a PNG data URL', async () => {
    expect(await qrSvg(URL_)).toMatch(/^<svg[\s\S]*<\/svg>\s*$/);
    expect(await qrDataUrl(URL_)).toMatch(/^data:image\/png;base64,/);
    expect(await qrSvg(URL_)).not.toBe(await qrSvg(URL_ + 'x'));
  });
});

describe('SetLabel', () => {
  let http: HttpTestingController;
  beforeEach(() => (http = configureBed()));
  afterEach(() => {
    http.verify();
    clearAuthStorage();
  });

  async function open(labels: unknown[]) {
    const m = await mount(SetLabel, { id: '5' });
    (await nextRequest(http, '/api/sets/5')).flush(setDetail());
    (await nextRequest(http, '/api/sets/5/labels')).flush(labels);
    await m.fixture.whenStable();
    return m;
  }

  it('shows the API\'s 409 while PUBLIC_BASE_URL is unset, and makes a label with its QR code once it is', async () => {
    const { fixture, loader, text } = await open([]);
    await (await loader.getHarness(MatButtonHarness.with({ text: /Make a label/ }))).click();
    (await nextRequest(http, (r) => r.method === 'POST' && r.url === '/api/sets/5/labels')).flush(
      { error: { code: 'public-base-url-missing', message: 'Provenance labels need the instance\u2019s public address: set PUBLIC_BASE_URL.' } },
      { status: 409, statusText: 'Conflict' },
    );
    await fixture.whenStable();
    expect(text()).toContain('set PUBLIC_BASE_URL');
    expect(text()).toContain('An admin sets PUBLIC_BASE_URL');
    expect((fixture.nativeElement as HTMLElement).querySelector('img')).toBeNull();

    await (await loader.getHarness(MatButtonHarness.with({ text: /Make a label/ }))).click();
    (await nextRequest(http, (r) => r.method === 'POST' && r.url === '/api/sets/5/labels')).flush(
      { id: 2, token: 'abcdefghijklmnopqrstuvwxyz012345', url: URL_, createdBy: ADA, createdAt: '2026-03-05T10:00:00Z', revokedAt: null },
      { status: 201, statusText: 'Created' },
    );
    for (let i = 0; i < 50 && !(fixture.nativeElement as HTMLElement).querySelector('img'); i++) {
      await nextTask(20);
      await fixture.whenStable();
    }
    const img = (fixture.nativeElement as HTMLElement).querySelector('img');
    expect(img?.getAttribute('src')).toMatch(/^data:image\/png;base64,/);
    expect(img?.getAttribute('alt')).toContain('QR code');
    expect(text()).toContain(URL_);
    expect(text()).toContain('Quillmere Radio Co. Wren 3');
    // The label carries no owner or set label.
    expect((fixture.nativeElement as HTMLElement).querySelector('figure')!.textContent).not.toContain('Wren on the shelf');
    expect((fixture.nativeElement as HTMLElement).querySelector('figure')!.textContent).not.toContain('Ada Voss');
  });

  it('revokes the label: its code goes, the revoked one is listed', async () => {
    const { fixture, loader, text } = await open([{ id: 2, token: 'abcdefghijklmnopqrstuvwxyz012345', url: URL_, createdBy: ADA, createdAt: '2026-03-05T10:00:00Z', revokedAt: null }]);
    await (await loader.getHarness(MatButtonHarness.with({ text: /Revoke this label/ }))).click();
    (await nextRequest(http, (r) => r.method === 'POST' && r.url === '/api/sets/5/labels/2/revoke')).flush({
      id: 2,
      token: null,
      url: null,
      createdBy: ADA,
      createdAt: '2026-03-05T10:00:00Z',
      revokedAt: '2026-03-06T10:00:00Z',
    });
    await fixture.whenStable();
    expect(text()).toContain('Revoked labels');
    expect(text()).not.toContain(URL_);
    expect(await loader.getAllHarnesses(MatButtonHarness.with({ text: /Make a label/ }))).toHaveSize(1);
  });
});
