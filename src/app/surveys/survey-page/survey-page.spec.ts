import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import type { ReadingInput, SurveyView } from '@domain/set-format';
import { clearAuthStorage, nextRequest, nextTask, sessionFor } from '../../../testing/http-testing';
import { Auth } from '../../core/auth/auth';
import { authToken } from '../../core/http/auth-token';
import { httpErrors } from '../../core/http/http-errors';
import { SURVEY_DB_NAME } from '../offline/survey-db';
import { record, savedAnswer, surveyView } from '../testing/survey-fixtures';
import { SurveyPage } from './survey-page';

const CLIENT_KEY = /^[A-Za-z0-9_-]{16,64}$/;

describe('SurveyPage', () => {
  let fixture: ComponentFixture<SurveyPage>;
  let http: HttpTestingController;
  let el: HTMLElement;
  let dbName: string;
  let timeout: number;

  // Each spec goes through IndexedDB a few times: on a busy shared machine 5 s can run out.
  beforeAll(() => {
    timeout = jasmine.DEFAULT_TIMEOUT_INTERVAL;
    jasmine.DEFAULT_TIMEOUT_INTERVAL = 15000;
  });
  afterAll(() => {
    jasmine.DEFAULT_TIMEOUT_INTERVAL = timeout;
  });

  beforeEach(() => {
    clearAuthStorage();
    dbName = `driftmark-spec-${Math.random().toString(36).slice(2)}`;
    TestBed.configureTestingModule({
      providers: [
        provideRouter([]),
        provideHttpClient(withInterceptors([httpErrors, authToken])),
        provideHttpClientTesting(),
        { provide: SURVEY_DB_NAME, useValue: dbName },
      ],
    });
    http = TestBed.inject(HttpTestingController);
    TestBed.inject(Auth).begin(sessionFor(['technician']));
  });

  afterEach(async () => {
    fixture?.destroy();
    http.verify();
    clearAuthStorage();
    await nextTask(10);
    indexedDB.deleteDatabase(dbName);
  });

  /** Opens the page; 'away' answers the survey GET with a network failure. */
  async function open(view: SurveyView | 'away' = surveyView()): Promise<void> {
    fixture = TestBed.createComponent(SurveyPage);
    fixture.componentRef.setInput('id', '5');
    el = fixture.nativeElement as HTMLElement;
    await fixture.whenStable();
    const get = await nextRequest(http, (r) => r.method === 'GET' && r.url === '/api/surveys/5');
    if (view === 'away') get.error(new ProgressEvent('error'), { status: 0, statusText: 'Unknown Error' });
    else get.flush(view);
    await settle();
  }

  /** Answers every save attempt made so far with a network failure. */
  async function failSaves(): Promise<number> {
    await settle();
    const reqs = http.match((r) => r.method === 'POST' && r.url === '/api/surveys/5/readings');
    for (const r of reqs) r.error(new ProgressEvent('error'), { status: 0, statusText: 'Unknown Error' });
    await settle();
    return reqs.length;
  }

  /** Lets IndexedDB, the outbox and rendering catch up. */
  async function settle(): Promise<void> {
    for (let i = 0; i < 4; i++) {
      await nextTask(20);
      await fixture.whenStable();
    }
  }

  const input = (key: string) => el.querySelector<HTMLInputElement>(`input[data-key="${key}"]`)!;
  const row = (key: string) => el.querySelector<HTMLElement>(`tr[data-row="${key}"]`)!;
  const verdictOf = (key: string) => row(key).querySelector('dm-verdict-badge')?.getAttribute('data-verdict') ?? null;
  const markOf = (key: string) => row(key).querySelector('.mark')?.getAttribute('data-mark') ?? null;

  function press(target: HTMLInputElement, key: string): KeyboardEvent {
    const ev = new KeyboardEvent('keydown', { key, bubbles: true, cancelable: true });
    target.dispatchEvent(ev);
    return ev;
  }

  function type(key: string, text: string): void {
    const i = input(key);
    i.focus();
    i.value = text;
    press(i, 'Enter');
  }

  const postedReading = () => nextRequest(http, (r) => r.method === 'POST' && r.url === '/api/surveys/5/readings');

  it('shows the stages as tabs with their counts, the rows in bench order, and the keys legend', async () => {
    await open();
    const tabs = Array.from(el.querySelectorAll('[mat-tab-link]')).map((t) => `${t.querySelector('.stage-name')!.textContent!.trim()}: ${t.querySelector('.stage-counts')!.textContent!.trim()}`);
    expect(tabs).toEqual(['Detector and first audio: 3 unread', 'Rectifier and filter: 1 unread']);
    const rows = Array.from(el.querySelectorAll('tr[data-row]')).map((r) => r.getAttribute('data-row'));
    expect(rows).toEqual(['tp-r1', 'tp-r2', 'tp-v1p']);
    const legend = el.querySelector('.legend')!.textContent!;
    for (const words of ['o open', 's short', 'c climbing', 'u unstable', 'n no access', 'l lead lifted']) expect(legend.replace(/\s+/g, ' ')).toContain(words);
    expect(el.querySelector('[data-test="total"]')!.textContent).toContain('4 unread');
  });

  it('shows the hot-chassis caution for an AC/DC set, and not for a transformer set', async () => {
    await open();
    expect(el.querySelector('.hot')!.textContent).toContain('isolation transformer');
    expect(el.querySelector('dm-safety-caution')).not.toBeNull();
    fixture.destroy();
    http.verify();
    const cold = surveyView();
    cold.set = { ...cold.set, hotChassis: false, power: 'transformer' };
    await open(cold);
    expect(el.querySelector('.hot')).toBeNull();
  });

  it('type 260k Enter: the verdict shows at once, the focus moves to the next row, the API confirms without moving it', async () => {
    const view = surveyView();
    await open(view);
    spyOn(performance, 'mark').and.callThrough();
    type('tp-r2', '260k');
    fixture.detectChanges();
    // At once, from the browser's SurveyGrid: 260 kΩ against 250 kΩ ±10 % is +4 %, inside 0.75 × 10 % (in band).
    expect(verdictOf('tp-r2')).toBe('in-band');
    expect(markOf('tp-r2')).toBe('waiting');
    expect(document.activeElement).toBe(input('tp-v1p'));
    expect(performance.mark).toHaveBeenCalledWith('reading-keyed');

    const req = await postedReading();
    const body = req.request.body as ReadingInput;
    expect(body.testPointKey).toBe('tp-r2');
    expect(body.text).toBe('260k');
    expect(body.method).toBe('in-circuit');
    expect(body.clientKey).toMatch(CLIENT_KEY);
    req.flush(savedAnswer(view, record('tp-r2', '260k', { clientKey: body.clientKey })), { status: 201, statusText: 'Created' });
    await settle();
    expect(markOf('tp-r2')).toBe('confirmed');
    expect(verdictOf('tp-r2')).toBe('in-band');
    expect(document.activeElement).toBe(input('tp-v1p'));
    expect(performance.mark).toHaveBeenCalledWith('verdict-shown');
    expect(row('tp-r2').querySelector('.drift')!.textContent).toContain('+4.0 %');
  });

  it('a single key in an empty field saves a state; typed letters in a value do not', async () => {
    await open();
    const i = input('tp-r1');
    i.focus();
    const ev = press(i, 'o');
    expect(ev.defaultPrevented).toBeTrue();
    fixture.detectChanges();
    expect(verdictOf('tp-r1')).toBe('open');
    const req = await postedReading();
    expect((req.request.body as ReadingInput).state).toBe('open');
    expect((req.request.body as ReadingInput).text).toBeUndefined();
    req.flush(savedAnswer(surveyView(), record('tp-r1', 'open', { clientKey: (req.request.body as ReadingInput).clientKey })), { status: 201, statusText: 'Created' });
    await settle();
    // Its twin: the same letter after a value is part of the text, not a state key.
    const j = input('tp-r2');
    j.focus();
    j.value = '47';
    expect(press(j, 's').defaultPrevented).toBeFalse();
  });

  it('text the core cannot parse stays in the field with the core’s message; nothing is sent and the focus stays', async () => {
    await open();
    type('tp-r2', '4k7k');
    fixture.detectChanges();
    expect(row('tp-r2').querySelector('[role="alert"]')!.textContent!.length).toBeGreaterThan(5);
    expect(input('tp-r2').value).toBe('4k7k');
    expect(document.activeElement).toBe(input('tp-r2'));
    expect(http.match((r) => r.method === 'POST').length).toBe(0);
    // Esc clears the field and the message; then a good value goes through.
    press(input('tp-r2'), 'Escape');
    fixture.detectChanges();
    expect(input('tp-r2').value).toBe('');
    expect(row('tp-r2').querySelector('[role="alert"]')).toBeNull();
    type('tp-r2', '250k');
    const req = await postedReading();
    expect((req.request.body as ReadingInput).text).toBe('250k');
    req.flush(savedAnswer(surveyView(), record('tp-r2', '250k', { clientKey: (req.request.body as ReadingInput).clientKey })), { status: 201, statusText: 'Created' });
    await settle();
  });

  it('arrows move between rows and across stages; Enter on an empty field moves on', async () => {
    await open();
    input('tp-r1').focus();
    press(input('tp-r1'), 'ArrowDown');
    expect(document.activeElement).toBe(input('tp-r2'));
    press(input('tp-r2'), 'ArrowUp');
    expect(document.activeElement).toBe(input('tp-r1'));
    input('tp-v1p').focus();
    press(input('tp-v1p'), 'Enter');
    await settle();
    // The next row is on the second stage: its tab is shown and its field has the focus.
    expect(el.querySelector('tr[data-row="tp-r3"]')).not.toBeNull();
    expect(document.activeElement).toBe(input('tp-r3'));
    press(input('tp-r3'), 'PageUp');
    await settle();
    expect(document.activeElement).toBe(input('tp-r1'));
  });

  it('shows the previous survey’s value only after this survey’s value is keyed', async () => {
    const view = surveyView({}, { previous: { surveyId: 4, startedAt: '2024-05-01T09:00:00Z', readings: [{ testPointKey: 'tp-r2', text: '262k', state: 'value', ohms: 262000 }] } });
    await open(view);
    expect(row('tp-r2').querySelector('.previous')!.textContent!.trim()).toBe('');
    type('tp-r2', '270k');
    fixture.detectChanges();
    expect(row('tp-r2').querySelector('.previous')!.textContent).toContain('262k');
    const req = await postedReading();
    req.flush(savedAnswer(view, record('tp-r2', '270k', { clientKey: (req.request.body as ReadingInput).clientKey })), { status: 201, statusText: 'Created' });
    await settle();
  });

  it('lift a lead: l then 2 records the lifted lead; the next reading there is lead-lifted and follows the prompting one', async () => {
    const prompting = record('tp-r2', '120k');
    const view = surveyView({}, { readings: [prompting] });
    view.evaluations = { [prompting.id]: savedAnswer(view, prompting).evaluation };
    await open(view);
    input('tp-r2').focus();
    press(input('tp-r2'), 'l');
    fixture.detectChanges();
    expect(el.querySelector('dm-row-detail .ends')!.textContent).toContain('B+1');
    press(input('tp-r2'), '2');
    const lift = await nextRequest(http, (r) => r.method === 'POST' && r.url === '/api/surveys/5/lifted-leads');
    expect(lift.request.body).toEqual({ componentKey: 'c-r2', end: 1, promptedByReadingId: prompting.id, note: '' });
    lift.flush({ id: 1, setId: 3, surveyId: 5, componentKey: 'c-r2', componentRef: 'R2', end: 1, node: 'B+1', promptedByReadingId: prompting.id, liftedBy: null, liftedAt: '2026-11-30T09:10:00Z', resolderedBy: null, resolderedAt: null, recheckReadingId: null, note: '' }, { status: 201, statusText: 'Created' });
    await settle();
    type('tp-r2', '250k');
    const req = await postedReading();
    const body = req.request.body as ReadingInput;
    expect(body.method).toBe('lead-lifted');
    expect(body.liftedEnd).toBe(1);
    expect(body.followsReadingId).toBe(prompting.id);
    req.flush(savedAnswer(view, record('tp-r2', '250k', { clientKey: body.clientKey, method: 'lead-lifted', liftedEnd: 1, followsReadingId: prompting.id })), { status: 201, statusText: 'Created' });
    await settle();
    expect(row('tp-r2').querySelector('.current')!.textContent).toContain('250k');
  });

  it('a stale correction shows both values, and saving mine sends the current version', async () => {
    const stored = record('tp-r2', '270k');
    const view = surveyView({}, { readings: [stored] });
    await open(view);
    input('tp-r2').focus();
    press(input('tp-r2'), 'F2');
    expect(input('tp-r2').value).toBe('270k');
    input('tp-r2').value = '275k';
    press(input('tp-r2'), 'Enter');
    const patch = await nextRequest(http, (r) => r.method === 'PATCH' && r.url === `/api/surveys/5/readings/${stored.id}`);
    expect(patch.request.body).toEqual({ version: 1, text: '275k' });
    const theirs = { ...stored, text: '280k', ohms: 280000, version: 2, enteredBy: { id: 9, name: 'Bo Lindqvist' } };
    patch.flush({ error: { code: 'stale-version', message: 'Changed meanwhile.', details: { current: theirs, yours: { version: 1, text: '275k' } } } }, { status: 409, statusText: 'Conflict' });
    await settle();
    const conflict = el.querySelector('[data-test="conflict"]')!;
    expect(conflict.querySelector('[data-test="theirs"]')!.textContent).toContain('280k');
    expect(conflict.querySelector('[data-test="theirs"]')!.textContent).toContain('Bo Lindqvist');
    expect(conflict.querySelector('[data-test="yours"]')!.textContent).toContain('275k');
    const buttons = Array.from(conflict.querySelectorAll('button'));
    buttons.find((b) => b.textContent!.includes('Save mine'))!.click();
    const again = await nextRequest(http, (r) => r.method === 'PATCH');
    expect(again.request.body).toEqual({ version: 2, text: '275k' });
    const mine = { ...theirs, text: '275k', ohms: 275000, version: 3 };
    again.flush(savedAnswer(view, mine));
    await settle();
    expect(el.querySelector('[data-test="conflict"]')).toBeNull();
    expect(row('tp-r2').querySelector('.current')!.textContent).toContain('275k');
  });

  it('warns when the meter reads its check resistor off its value', async () => {
    const view = surveyView({
      meter: { name: 'Bench DMM', profile: { kind: 'digital', autorange: true, leadOhms: 0.2, ranges: [{ fullScaleOhms: 1999.9, resolutionOhms: 0.1, pctOfReading: 0.8, counts: 3 }] }, checkDate: null },
    } as Partial<SurveyView['survey']>);
    await open(view);
    const field = el.querySelector<HTMLInputElement>('.meter-check input')!;
    field.value = '1k1';
    field.dispatchEvent(new KeyboardEvent('keydown', { key: 'Enter', bubbles: true }));
    const req = await nextRequest(http, (r) => r.method === 'POST' && r.url === '/api/surveys/5/meter-check');
    expect(req.request.body).toEqual({ text: '1k1' });
    req.flush({ text: '1k1', ohms: 1100, knownOhms: 1000, tolerancePct: 1, ok: false, message: 'The reading is 10 % above the known value.', at: '2026-11-30T09:01:00Z' });
    await settle();
    expect(el.querySelector('[data-test="meter-warning"]')!.textContent).toContain('10 % above');
    expect(el.querySelector('.meter-check')).toBeNull();
  });

  it('a complete survey takes no keys and offers amendments with a reason', async () => {
    const stored = record('tp-r2', '270k');
    const view = surveyView({ state: 'complete', editable: false }, { readings: [stored] });
    await open(view);
    input('tp-r2').focus();
    input('tp-r2').value = '';
    press(input('tp-r2'), 'o');
    expect(http.match((r) => r.method === 'POST').length).toBe(0);
    fixture.detectChanges();
    const form = el.querySelector('dm-row-detail form.amend')!;
    const [text, reason] = Array.from(form.querySelectorAll<HTMLInputElement>('input'));
    text.value = '268k';
    text.dispatchEvent(new Event('input'));
    form.querySelector<HTMLButtonElement>('button[type="submit"]')!.click();
    await settle();
    expect(el.querySelector('[data-test="amend-message"]')!.textContent).toContain('reason');
    expect(http.match((r) => r.url.endsWith('/amendments')).length).toBe(0);
    reason.value = 'Transcription slip: the meter showed 268k';
    reason.dispatchEvent(new Event('input'));
    form.querySelector<HTMLButtonElement>('button[type="submit"]')!.click();
    const amend = await nextRequest(http, (r) => r.method === 'POST' && r.url === '/api/surveys/5/amendments');
    expect(amend.request.body).toEqual({ readingId: stored.id, reason: 'Transcription slip: the meter showed 268k', change: { text: '268k', testPointKey: 'tp-r2' } });
    amend.flush({ id: 1, readingId: stored.id, reason: 'x', change: { before: null, after: null }, amendedBy: null, createdAt: '2026-12-01T10:00:00Z' }, { status: 201, statusText: 'Created' });
    (await nextRequest(http, (r) => r.method === 'GET' && r.url === '/api/surveys/5')).flush(view);
    await settle();
  });

  it('an out-of-band reading stands out in its row by glyph and word; an in-band twin does not', async () => {
    await open();
    type('tp-r1', '10M');
    type('tp-r2', '330k');
    fixture.detectChanges();
    expect(verdictOf('tp-r2')).toBe('high');
    expect(row('tp-r2').querySelector('dm-verdict-badge')!.textContent).toContain('high');
    expect(row('tp-r2').classList).toContain('out');
    expect(verdictOf('tp-r1')).toBe('in-band');
    expect(row('tp-r1').classList).not.toContain('out');
    const first = await postedReading();
    first.flush(savedAnswer(surveyView(), record('tp-r1', '10M', { clientKey: (first.request.body as ReadingInput).clientKey })), { status: 201, statusText: 'Created' });
    const second = await postedReading();
    second.flush(savedAnswer(surveyView(), record('tp-r2', '330k', { clientKey: (second.request.body as ReadingInput).clientKey })), { status: 201, statusText: 'Created' });
    await settle();
  });

  it('offline: readings wait in this browser, survive a reload, and are sent in order, once each, when the API answers', async () => {
    const view = surveyView();
    await open(view);
    fixture.destroy();

    // Reload with the API away: this browser's copy of the survey shows, and keying goes on.
    await open('away');
    expect(el.querySelector('[data-test="offline"]')).not.toBeNull();
    type('tp-r1', '10M');
    type('tp-r2', '260k');
    type('tp-v1p', '250k');
    await settle();
    // Enter on the stage's last row went on to the next stage: back to the first.
    el.querySelector<HTMLElement>('[mat-tab-link]')!.click();
    await settle();
    expect(verdictOf('tp-r2')).toBe('in-band');
    expect(markOf('tp-r2')).toBe('waiting');
    expect(await failSaves()).toBeGreaterThan(0);
    expect(el.querySelector('[data-test="waiting"]')!.textContent).toContain('3 writes wait');

    // Reload again, still away: the waiting readings are still there, in their rows.
    fixture.destroy();
    await open('away');
    await failSaves();
    expect(el.querySelector('[data-test="waiting"]')!.textContent).toContain('3 writes wait');
    expect(row('tp-r1').querySelector('.current')!.textContent).toContain('10M');
    expect(row('tp-r2').querySelector('.current')!.textContent).toContain('260k');
    expect(markOf('tp-v1p')).toBe('waiting');

    // The API answers again: each reading is sent once, in the order keyed.
    window.dispatchEvent(new Event('online'));
    const order: string[] = [];
    for (let i = 0; i < 3; i++) {
      const req = await postedReading();
      const body = req.request.body as ReadingInput;
      expect(body.clientKey).toMatch(CLIENT_KEY);
      order.push(body.testPointKey);
      req.flush(savedAnswer(view, record(body.testPointKey, body.text!, { clientKey: body.clientKey })), { status: 201, statusText: 'Created' });
      await settle();
    }
    expect(order).toEqual(['tp-r1', 'tp-r2', 'tp-v1p']);
    expect(http.match((r) => r.method === 'POST').length).toBe(0);
    expect(el.querySelector('[data-test="waiting"]')).toBeNull();
    expect(markOf('tp-r1')).toBe('confirmed');
    expect(markOf('tp-v1p')).toBe('confirmed');
  });

  it('a high in-circuit reading says to check the path; j marks its joints checked', async () => {
    await open();
    type('tp-r2', '330k');
    const req = await postedReading();
    req.flush(savedAnswer(surveyView(), record('tp-r2', '330k', { clientKey: (req.request.body as ReadingInput).clientKey })), { status: 201, statusText: 'Created' });
    await settle();
    input('tp-r2').focus();
    await settle();
    expect(el.querySelector('dm-row-detail .advice')!.textContent).toContain('Path high: check the joints and contacts, then the part');
    const ev = press(input('tp-r2'), 'j');
    expect(ev.defaultPrevented).toBeTrue();
    const joint = await nextRequest(http, (r) => r.method === 'POST' && r.url === '/api/surveys/5/joint-checks');
    expect(joint.request.body).toEqual({ testPointKey: 'tp-r2', checked: true });
    joint.flush({});
    await settle();
    expect(row('tp-r2').textContent).toContain('joints checked');
    // Its twin: j again clears the mark.
    press(input('tp-r2'), 'j');
    const clear = await nextRequest(http, (r) => r.method === 'POST' && r.url === '/api/surveys/5/joint-checks');
    expect(clear.request.body).toEqual({ testPointKey: 'tp-r2', checked: false });
    clear.flush({});
    await settle();
    expect(row('tp-r2').textContent).not.toContain('joints checked');
  });

  it('complete waits for waiting writes, asks once more, then makes the survey read-only', async () => {
    const view = surveyView();
    await open(view);
    type('tp-r2', '260k');
    fixture.detectChanges();
    const button = () => el.querySelector<HTMLButtonElement>('[data-test="complete"]');
    expect(button()!.disabled).toBeTrue();
    expect(el.querySelector('[data-test="complete-waits"]')).not.toBeNull();
    const req = await postedReading();
    const body = req.request.body as ReadingInput;
    const stored = record('tp-r2', '260k', { clientKey: body.clientKey });
    req.flush(savedAnswer(view, stored), { status: 201, statusText: 'Created' });
    await settle();
    expect(button()!.disabled).toBeFalse();
    button()!.click();
    await settle();
    expect(button()!.textContent).toContain('Confirm');
    expect(http.match((r) => r.url.endsWith('/complete')).length).toBe(0);
    button()!.click();
    (await nextRequest(http, (r) => r.method === 'POST' && r.url === '/api/surveys/5/complete')).flush({});
    const done = surveyView({ state: 'complete', editable: false, completedAt: '2026-11-30T11:00:00Z' }, { readings: [stored] });
    (await nextRequest(http, (r) => r.method === 'GET' && r.url === '/api/surveys/5')).flush(done);
    await settle();
    expect(el.querySelector('[data-test="survey-state"]')!.textContent).toContain('complete');
    expect(button()).toBeNull();
    expect(input('tp-r1').readOnly).toBeTrue();
  });

  it('the next reading of a row takes the range and note chosen beside it; the note goes with one reading only', async () => {
    const view = surveyView({
      meter: {
        name: 'Bench DMM',
        profile: {
          kind: 'digital',
          autorange: false,
          leadOhms: 0.2,
          ranges: [
            { fullScaleOhms: 199.99e3, resolutionOhms: 10, pctOfReading: 0.8, counts: 3 },
            { fullScaleOhms: 1.9999e6, resolutionOhms: 100, pctOfReading: 0.8, counts: 3 },
          ],
        },
        checkDate: null,
      },
      meterCheck: { text: '1k', ohms: 1000, knownOhms: 1000, tolerancePct: 1, ok: true, message: '', at: '2026-11-30T09:01:00Z' },
    } as Partial<SurveyView['survey']>);
    await open(view);
    input('tp-r2').focus();
    await settle();
    const range = el.querySelector<HTMLSelectElement>('dm-row-detail [data-test="range"]')!;
    range.value = '1';
    range.dispatchEvent(new Event('change'));
    const note = el.querySelector<HTMLInputElement>('dm-row-detail [data-test="note"]')!;
    note.value = 'wax on the lug';
    note.dispatchEvent(new Event('input'));
    await settle();
    type('tp-r2', '260k');
    const first = await postedReading();
    const body = first.request.body as ReadingInput;
    expect(body.rangeIndex).toBe(1);
    expect(body.note).toBe('wax on the lug');
    first.flush(savedAnswer(view, record('tp-r2', '260k', { clientKey: body.clientKey, rangeIndex: 1, note: 'wax on the lug' })), { status: 201, statusText: 'Created' });
    await settle();
    type('tp-r2', '255k');
    const second = await postedReading();
    const again = second.request.body as ReadingInput;
    expect(again.rangeIndex).toBe(1);
    expect(again.note).toBeUndefined();
    second.flush(savedAnswer(view, record('tp-r2', '255k', { clientKey: again.clientKey, rangeIndex: 1 })), { status: 201, statusText: 'Created' });
    await settle();
  });

  it('a lifted lead survives a reload until its reading is keyed; "not lifted" puts the row back in circuit', async () => {
    const prompting = record('tp-r2', '120k');
    const view = surveyView({}, { readings: [prompting] });
    await open(view);
    input('tp-r2').focus();
    press(input('tp-r2'), 'l');
    press(input('tp-r2'), '1');
    const lift = await nextRequest(http, (r) => r.method === 'POST' && r.url === '/api/surveys/5/lifted-leads');
    expect(lift.request.body).toEqual({ componentKey: 'c-r2', end: 0, promptedByReadingId: prompting.id, note: '' });
    lift.flush({ id: 2, setId: 3, surveyId: 5, componentKey: 'c-r2', componentRef: 'R2', end: 0, node: 'V1.7', promptedByReadingId: prompting.id, liftedBy: null, liftedAt: '2026-11-30T09:10:00Z', resolderedBy: null, resolderedAt: null, recheckReadingId: null, note: '' }, { status: 201, statusText: 'Created' });
    await settle();
    await nextTask(300);
    fixture.destroy();

    await open(view);
    expect(row('tp-r2').querySelector('.lift')!.textContent).toContain('lead lifted, end 1');
    type('tp-r2', '250k');
    const req = await postedReading();
    const body = req.request.body as ReadingInput;
    expect(body.method).toBe('lead-lifted');
    expect(body.liftedEnd).toBe(0);
    expect(body.followsReadingId).toBe(prompting.id);
    const followUp = record('tp-r2', '250k', { clientKey: body.clientKey, method: 'lead-lifted', liftedEnd: 0, followsReadingId: prompting.id });
    req.flush(savedAnswer(view, followUp), { status: 201, statusText: 'Created' });
    await settle();

    // Its twin: the lead is back; the next reading is in circuit again.
    input('tp-r2').focus();
    await settle();
    Array.from(el.querySelectorAll<HTMLButtonElement>('dm-row-detail .lifted button')).find((b) => b.textContent!.includes('Not lifted'))!.click();
    await settle();
    type('tp-r2', '240k');
    const back = await postedReading();
    expect((back.request.body as ReadingInput).method).toBe('in-circuit');
    expect((back.request.body as ReadingInput).liftedEnd).toBeNull();
    back.flush(savedAnswer(view, record('tp-r2', '240k', { clientKey: (back.request.body as ReadingInput).clientKey })), { status: 201, statusText: 'Created' });
    await settle();
  });
});
