import { HttpTestingController } from '@angular/common/http/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatCheckboxHarness } from '@angular/material/checkbox/testing';
import { clearAuthStorage, nextRequest } from '../../../testing/http-testing';
import { configureBed, mount } from '../../sets/testing/section-bed';
import { meterRecord } from '../../sets/testing/set-fixtures';
import { MeterList } from './meter-list';

describe('MeterList', () => {
  let http: HttpTestingController;
  beforeEach(() => (http = configureBed()));
  afterEach(() => {
    http.verify();
    clearAuthStorage();
  });

  it('lists the profiles with their check, archives one and shows archived ones on request', async () => {
    const { fixture, loader, text } = await mount(MeterList, {});
    const first = await nextRequest(http, (r) => r.url === '/api/meter-profiles');
    expect(first.request.params.has('archived')).toBeFalse();
    first.flush({ items: [meterRecord(), meterRecord({ id: 6, name: 'Grey analogue', profile: { kind: 'analogue', leadOhms: 0.1, ranges: [{ centreOhms: 12, arcFraction: 0.03 }] }, checkDate: null, checkResistorOhms: null, checkResistorTolerancePct: null })] });
    await fixture.whenStable();
    expect(text()).toContain('Bench DMM');
    expect(text()).toContain('Checked 2026-01-15');
    expect(text()).toContain('check resistor 10 kΩ ±0.1 %');
    expect(text()).toContain('No calibration or check date');
    expect(text()).toContain('Analogue · 1 range');

    await (await loader.getHarness(MatButtonHarness.with({ text: /Archive Grey analogue/ }))).click();
    (await nextRequest(http, (r) => r.method === 'DELETE' && r.url === '/api/meter-profiles/6')).flush(null, { status: 204, statusText: 'No Content' });
    (await nextRequest(http, (r) => r.url === '/api/meter-profiles' && r.method === 'GET')).flush({ items: [meterRecord()] });
    await fixture.whenStable();
    expect(text()).not.toContain('Grey analogue');

    await (await loader.getHarness(MatCheckboxHarness)).check();
    const archived = await nextRequest(http, (r) => r.url === '/api/meter-profiles' && r.params.get('archived') === 'true');
    archived.flush({ items: [meterRecord(), meterRecord({ id: 6, name: 'Grey analogue', archived: true })] });
    await fixture.whenStable();
    expect(text()).toContain('archived');
    expect(await loader.getAllHarnesses(MatButtonHarness.with({ text: /Archive Grey analogue/ }))).toHaveSize(0);
  });
});
