import { HttpErrorResponse, provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { firstValueFrom } from 'rxjs';
import { SetsApi, firstPowerReasons } from './sets-api';
import { partInstance } from './testing/set-fixtures';

describe('firstPowerReasons', () => {
  it('names each open gate item and each open lifted lead of a 409 body', () => {
    const err = new HttpErrorResponse({
      status: 409,
      error: {
        error: {
          code: 'first-power-blocked',
          message: 'Not recorded as ready for first power.',
          details: {
            blockers: [
              { kind: 'gate-item', itemKey: 'load-connected', title: 'Speaker or output load connected' },
              { kind: 'lifted-lead', leadId: 3, componentRef: 'R12', end: 0, node: 'V3.7' },
            ],
          },
        },
      },
    });
    expect(firstPowerReasons(err)).toEqual(['Gate item not signed: Speaker or output load connected', 'Lifted lead not re-soldered: R12 (end at V3.7)']);
  });

  it('gives nothing for an answer without details, or for something that is not an HTTP error', () => {
    expect(firstPowerReasons(new HttpErrorResponse({ status: 409, error: { error: { code: 'x', message: 'm' } } }))).toEqual([]);
    expect(firstPowerReasons(new Error('boom'))).toEqual([]);
  });
});

describe('SetsApi', () => {
  let api: SetsApi;
  let http: HttpTestingController;

  beforeEach(() => {
    TestBed.configureTestingModule({ providers: [provideHttpClient(), provideHttpClientTesting()] });
    api = TestBed.inject(SetsApi);
    http = TestBed.inject(HttpTestingController);
  });
  afterEach(() => http.verify());

  it('asks for a page of sets with the search and status only when given', async () => {
    const all = firstValueFrom(api.list({ q: '  ', status: '', page: 1, pageSize: 25 }));
    const req = http.expectOne((r) => r.url === '/api/sets');
    expect(req.request.params.keys().sort()).toEqual(['page', 'pageSize']);
    req.flush({ items: [], total: 0, page: 1, pageSize: 25 });
    await all;
    const some = firstValueFrom(api.list({ q: ' wren ', status: 'done', page: 2, pageSize: 10 }));
    const req2 = http.expectOne((r) => r.url === '/api/sets');
    expect(req2.request.params.get('q')).toBe('wren');
    expect(req2.request.params.get('status')).toBe('done');
    expect(req2.request.params.get('page')).toBe('2');
    req2.flush({ items: [], total: 0, page: 2, pageSize: 10 });
    await some;
  });

  it('takes the export file name from Content-Disposition, and falls back to its own', async () => {
    const named = firstValueFrom(api.exportSets('csv'));
    http.expectOne((r) => r.url === '/api/export/sets' && r.params.get('format') === 'csv').flush('set,survey\n', { headers: { 'Content-Disposition': 'attachment; filename="sets-2026.csv"' } });
    expect(await named).toEqual({ filename: 'sets-2026.csv', text: 'set,survey\n' });
    const unnamed = firstValueFrom(api.exportSets('json'));
    http.expectOne((r) => r.url === '/api/export/sets' && r.params.get('format') === 'json').flush('{}');
    expect(await unnamed).toEqual({ filename: 'driftmark-sets.json', text: '{}' });
  });

  it('reads the history as a list of part instances, bare or under `parts`', async () => {
    const bare = firstValueFrom(api.history(5));
    http.expectOne('/api/sets/5/history').flush([partInstance()]);
    expect((await bare).parts.map((p) => p.ref)).toEqual(['R2']);
    const wrapped = firstValueFrom(api.history(5));
    http.expectOne('/api/sets/5/history').flush({ parts: [partInstance(), partInstance({ instance: 2, original: false })] });
    expect((await wrapped).parts.length).toBe(2);
  });
});
