import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MatDialog } from '@angular/material/dialog';
import { provideRouter } from '@angular/router';
import type { AssignmentDetail } from '@domain/class-format';
import type { ReadingInput, SurveyView } from '@domain/set-format';
import { clearAuthStorage, nextRequest, nextTask, sessionFor } from '../../../testing/http-testing';
import { Auth } from '../../core/auth/auth';
import { authToken } from '../../core/http/auth-token';
import { httpErrors } from '../../core/http/http-errors';
import { SURVEY_DB_NAME, SurveyDb, type CachedView } from '../offline/survey-db';
import { attempt, classSurveyView, record, savedAnswer } from '../testing/survey-fixtures';
import { SurveyPage } from './survey-page';

/** The assignment's detail as GET /api/assignments/:id answers (only the parts the grid reads matter). */
function assignmentDetail(over: Partial<AssignmentDetail> = {}): AssignmentDetail {
  return {
    id: 21,
    classId: 4,
    title: 'Wren 3: first audio stage',
    dueAt: '2099-03-01T17:00:00Z',
    templateId: 11,
    versionNumber: 2,
    maker: 'Quillmere Radio Co.',
    model: 'Wren 3',
    setId: 3,
    setLabel: 'Kitchen Wren',
    predictFirst: false,
    showVerdicts: true,
    awaitingReview: null,
    myStatus: 'submitted',
    mySurveyId: 5,
    instructions: '',
    className: 'Bench basics',
    instructor: { id: 9, name: 'Bo Lindqvist' },
    rule: { decision: 'simple', nearLimitFraction: 0.75, bandFrom: 'template' },
    set: { id: 3, label: 'Kitchen Wren', serial: 'QW3-0417', maker: 'Quillmere Radio Co.', model: 'Wren 3', hotChassis: true },
    referenceSurveyId: null,
    queue: [],
    myAttempts: [],
    ...over,
  };
}

/**
 * The bench grid in class mode (issue #6): the assignment's header, predict first, verdicts
 * hidden until submission, a returned survey's re-measuring, Submit, and an instructor reading a
 * student's survey. HTTP is stubbed; IndexedDB and the domain module are real.
 */
describe('SurveyPage (class survey)', () => {
  let fixture: ComponentFixture<SurveyPage>;
  let http: HttpTestingController;
  let el: HTMLElement;
  let dbName: string;
  let timeout: number;

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
    TestBed.inject(Auth).begin(sessionFor(['student']));
  });

  afterEach(async () => {
    TestBed.inject(MatDialog).closeAll();
    fixture?.destroy();
    http.verify();
    clearAuthStorage();
    await nextTask(10);
    indexedDB.deleteDatabase(dbName);
  });

  async function open(view: SurveyView | 'away'): Promise<void> {
    fixture = TestBed.createComponent(SurveyPage);
    fixture.componentRef.setInput('id', '5');
    el = fixture.nativeElement as HTMLElement;
    await fixture.whenStable();
    const get = await nextRequest(http, (r) => r.method === 'GET' && r.url === '/api/surveys/5');
    if (view === 'away') get.error(new ProgressEvent('error'), { status: 0, statusText: 'Unknown Error' });
    else get.flush(view);
    await settle();
  }

  /** This browser's copy of survey 5 once it is written as `ok` says (IndexedDB answers in its own time). */
  async function copyKept(ok: (c: CachedView) => boolean = () => true): Promise<void> {
    const db = TestBed.inject(SurveyDb);
    for (let i = 0; i < 100; i++) {
      const c = await db.view(5);
      if (c !== undefined && ok(c)) return;
      await nextTask(20);
    }
    fail('this browser’s copy of the survey was not written');
  }

  async function settle(): Promise<void> {
    for (let i = 0; i < 4; i++) {
      await nextTask(20);
      await fixture.whenStable();
    }
  }

  const input = (key: string) => el.querySelector<HTMLInputElement>(`input[data-key="${key}"]`)!;
  const row = (key: string) => el.querySelector<HTMLElement>(`tr[data-row="${key}"]`)!;
  const text = (sel: string) => el.querySelector(sel)?.textContent?.replace(/\s+/g, ' ').trim() ?? null;
  const verdictOf = (key: string) => row(key).querySelector('dm-verdict-badge')?.getAttribute('data-verdict') ?? null;
  const postedReading = () => nextRequest(http, (r) => r.method === 'POST' && r.url === '/api/surveys/5/readings');
  const dialog = () => document.querySelector('mat-dialog-container');

  /** The dialog's closing animation has run (a short CSS transition). */
  async function dialogGone(): Promise<boolean> {
    for (let i = 0; i < 50 && dialog() !== null; i++) await nextTask(20);
    return dialog() === null;
  }

  function press(target: HTMLInputElement, key: string): KeyboardEvent {
    const ev = new KeyboardEvent('keydown', { key, bubbles: true, cancelable: true });
    target.dispatchEvent(ev);
    return ev;
  }

  function type(key: string, value: string): void {
    const i = input(key);
    i.focus();
    i.value = value;
    press(i, 'Enter');
  }

  it('shows the assignment’s title, due date and a late chip when past due; Submit replaces Complete', async () => {
    await open(classSurveyView({ dueAt: '2026-01-15T17:00:00Z' }));
    expect(text('[data-test="class-head"] h1')).toBe('Wren 3: first audio stage');
    expect(text('[data-test="due"]')).toContain('2026');
    expect(el.querySelector('[data-test="late"]')).not.toBeNull();
    expect(el.querySelector('.crumbs a[href="/assignments/21"]')).not.toBeNull();
    // A student may not open the training set's page: no crumb to it.
    expect(el.querySelector('.crumbs a[href="/sets/3"]')).toBeNull();
    expect(el.querySelector('[data-test="submit"]')).not.toBeNull();
    expect(el.querySelector('[data-test="complete"]')).toBeNull();
    fixture.destroy();

    // Its twin: due in the future, not late.
    await open(classSurveyView({ dueAt: '2099-03-01T17:00:00Z' }));
    expect(text('[data-test="due"]')).toContain('2099');
    expect(el.querySelector('[data-test="late"]')).toBeNull();
  });

  it('predict first: the row asks for a prediction with the expectation hidden; Enter shows it and takes the measured value; both are posted', async () => {
    const view = classSurveyView({ predictFirst: true });
    await open(view);
    expect(text('[data-test="legend-predict"]')).toContain('Predict first');
    expect(row('tp-r2').querySelector('[data-test="predict-label"]')!.textContent).toContain('Predict (in circuit)');
    expect(input('tp-r2').getAttribute('aria-label')).toMatch(/^Predict the in-circuit reading for R2/);
    expect(row('tp-r2').querySelector('.expected')!.textContent).not.toContain('250 kΩ');
    expect(row('tp-r2').querySelector('.incircuit')!.textContent).not.toContain('healthy');
    expect(row('tp-r2').querySelector('[data-test="concealed"]')).not.toBeNull();
    input('tp-r2').focus();
    await settle();
    expect(el.querySelector('dm-row-detail [data-test="detail-concealed"]')).not.toBeNull();
    expect(el.querySelector('dm-row-detail h2')!.textContent!.trim()).toBe('R2');
    expect(el.querySelector('dm-row-detail')!.textContent).not.toContain('250 kΩ');
    expect(el.querySelector('dm-row-detail')!.textContent).not.toContain('healthy');

    // A state key is not a shortcut while predicting: the letter is typed.
    expect(press(input('tp-r2'), 'o').defaultPrevented).toBeFalse();
    // A prediction the core cannot read stays with a message; nothing is sent.
    type('tp-r2', '4k7k');
    await settle();
    expect(row('tp-r2').querySelector('[role="alert"]')).not.toBeNull();
    expect(row('tp-r2').querySelector('[data-test="concealed"]')).not.toBeNull();

    type('tp-r2', '240k');
    await settle();
    expect(http.match((r) => r.method === 'POST').length).toBe(0);
    expect(input('tp-r2').value).toBe('');
    expect(document.activeElement).toBe(input('tp-r2'));
    expect(row('tp-r2').querySelector('.expected')!.textContent).toContain('250 kΩ');
    expect(row('tp-r2').querySelector('.incircuit')!.textContent).toContain('healthy 225 kΩ – 275 kΩ');
    expect(el.querySelector('dm-row-detail')!.textContent).toContain('a healthy network reads');
    expect(row('tp-r2').querySelector('[data-test="predicted"]')!.textContent).toContain('predicted 240k');
    expect(input('tp-r2').getAttribute('aria-label')).toMatch(/^Reading for R2/);
    expect(el.querySelector('dm-row-detail [data-test="detail-prediction"]')!.textContent).toContain('240k');
    expect(el.querySelector('dm-row-detail h2')!.textContent).toContain('250 kΩ');

    type('tp-r2', '262k');
    const req = await postedReading();
    const body = req.request.body as ReadingInput;
    expect(body.text).toBe('262k');
    expect(body.prediction).toBe('240k');
    req.flush(savedAnswer(view, record('tp-r2', '262k', { clientKey: body.clientKey, prediction: '240k' })), { status: 201, statusText: 'Created' });
    await settle();
    expect(row('tp-r2').querySelector('[data-test="prediction"]')!.textContent).toContain('predicted 240k');
    // The next reading of a read row takes no prediction.
    type('tp-r2', '263k');
    const again = await postedReading();
    expect((again.request.body as ReadingInput).prediction).toBeUndefined();
    again.flush(savedAnswer(view, record('tp-r2', '263k', { clientKey: (again.request.body as ReadingInput).clientKey })), { status: 201, statusText: 'Created' });
    await settle();
  });

  it('predict first: a measured value the server refuses gives its prediction back to the row', async () => {
    await open(classSurveyView({ predictFirst: true }));
    type('tp-r2', '240k');
    await settle();
    type('tp-r2', '262k');
    const req = await postedReading();
    expect((req.request.body as ReadingInput).prediction).toBe('240k');
    // While it waits, the row shows the reading and its prediction.
    expect(row('tp-r2').querySelector('[data-test="prediction"]')!.textContent).toContain('240k');
    req.flush({ error: { code: 'survey-not-draft', message: 'This survey is submitted: it waits for the instructor’s review.' } }, { status: 409, statusText: 'Conflict' });
    await settle();
    expect(row('tp-r2').querySelector('.error')!.textContent).toContain('submitted');
    expect(row('tp-r2').querySelector('[data-test="predicted"]')!.textContent).toContain('predicted 240k');
    expect(row('tp-r2').querySelector('[data-test="concealed"]')).toBeNull();
  });

  it('predict first leaves rows alone outside predict-first assignments and on rows already read', async () => {
    const stored = record('tp-r1', '10M');
    await open(classSurveyView({ predictFirst: true }, {}, { readings: [stored] }));
    expect(row('tp-r1').querySelector('[data-test="concealed"]')).toBeNull();
    expect(row('tp-r1').querySelector('.expected')!.textContent).toContain('10 MΩ');
    expect(row('tp-r2').querySelector('[data-test="concealed"]')).not.toBeNull();
    fixture.destroy();
    http.verify();

    await open(classSurveyView({ predictFirst: false }));
    expect(el.querySelector('[data-test="legend-predict"]')).toBeNull();
    expect(row('tp-r2').querySelector('[data-test="concealed"]')).toBeNull();
    expect(row('tp-r2').querySelector('.expected')!.textContent).toContain('250 kΩ');
  });

  it('a typed prediction not yet measured survives a reload; Esc on an empty field takes it back', async () => {
    const view = classSurveyView({ predictFirst: true });
    await open(view);
    type('tp-r2', '240k');
    await settle();
    expect(row('tp-r2').querySelector('[data-test="predicted"]')).not.toBeNull();
    await copyKept((c) => c.predictions?.length === 1);
    fixture.destroy();

    // Reloaded (the API answers again): the prediction is still there and goes with the measured value.
    await open(view);
    expect(row('tp-r2').querySelector('[data-test="predicted"]')!.textContent).toContain('240k');
    expect(row('tp-r2').querySelector('[data-test="concealed"]')).toBeNull();
    await copyKept((c) => c.predictions?.length === 1 && c.view.classwork?.predictFirst === true);
    fixture.destroy();

    // Reloaded with the API away: this browser's copy still has it.
    await open('away');
    expect(row('tp-r2').querySelector('[data-test="predicted"]')!.textContent).toContain('240k');
    input('tp-r2').focus();
    press(input('tp-r2'), 'Escape');
    await settle();
    expect(row('tp-r2').querySelector('[data-test="predicted"]')).toBeNull();
    expect(row('tp-r2').querySelector('[data-test="concealed"]')).not.toBeNull();
    await copyKept((c) => c.predictions?.length === 0);
    fixture.destroy();

    // Taken back, it stays taken back after a reload.
    await open(view);
    expect(row('tp-r2').querySelector('[data-test="concealed"]')).not.toBeNull();
  });

  it('verdicts hidden while measuring: no glyph, word, drift or counts; a saved mark only', async () => {
    const view = classSurveyView({ showVerdicts: false });
    await open(view);
    expect(text('[data-test="verdicts-note"]')).toContain('Verdicts show after you submit');
    type('tp-r2', '330k');
    const req = await postedReading();
    const body = req.request.body as ReadingInput;
    req.flush(savedAnswer(view, record('tp-r2', '330k', { clientKey: body.clientKey })), { status: 201, statusText: 'Created' });
    await settle();
    expect(row('tp-r2').querySelector('.current')!.textContent).toContain('330k');
    expect(verdictOf('tp-r2')).toBeNull();
    expect(row('tp-r2').classList).not.toContain('out');
    expect(row('tp-r2').querySelector('.drift')!.textContent!.trim()).toBe('');
    expect(row('tp-r2').querySelector('.mark')!.getAttribute('data-mark')).toBe('saved');
    expect(el.querySelector('.stage-counts')).toBeNull();
    expect(text('[data-test="total"]')).toContain('1 of 4 test points read');
    expect(text('[data-test="total"]')).not.toContain('out');
    input('tp-r2').focus();
    await settle();
    expect(text('dm-row-detail [data-test="verdict-hidden"]')).toContain('after you submit');
    expect(el.querySelector('dm-row-detail dm-verdict-badge')).toBeNull();
    expect(el.querySelector('dm-row-detail .advice')).toBeNull();
  });

  it('verdicts show once submitted, and throughout when the assignment shows them', async () => {
    const stored = record('tp-r2', '330k');
    const submitted = classSurveyView({ showVerdicts: false, attemptCount: 1 }, { state: 'submitted', editable: false }, { readings: [stored] });
    await open(submitted);
    (await nextRequest(http, (r) => r.method === 'GET' && r.url === '/api/assignments/21')).flush(assignmentDetail({ myAttempts: [attempt()] }));
    await settle();
    expect(verdictOf('tp-r2')).toBe('high');
    expect(row('tp-r2').classList).toContain('out');
    expect(row('tp-r2').querySelector('.drift')!.textContent).toContain('+32.0 %');
    expect(el.querySelector('[data-test="verdicts-note"]')).toBeNull();
    // Read-only, with the way to the submission (the newest of the student's attempts).
    expect(text('[data-test="submitted-readonly"]')).toContain('read-only until your instructor reviews it');
    expect(el.querySelector('[data-test="review-link"]')!.getAttribute('href')).toBe('/attempts/41/review');
    expect(input('tp-r2').readOnly).toBeTrue();
    fixture.destroy();
    http.verify();

    await open(classSurveyView({ showVerdicts: true }, {}, { readings: [stored] }));
    expect(verdictOf('tp-r2')).toBe('high');
    expect(el.querySelector('.stage-counts')).not.toBeNull();
  });

  it('returned: only the requested points take a reading, which follows the submitted one; the banner lists them', async () => {
    const r1 = record('tp-r1', '10M', { takenAt: '2026-11-30T09:05:00Z' });
    const r2 = record('tp-r2', '330k', { takenAt: '2026-11-30T09:06:00Z' });
    const view = classSurveyView({ remeasureKeys: ['tp-r2'], attemptCount: 1 }, { state: 'returned' }, { readings: [r1, r2] });
    await open(view);
    (await nextRequest(http, (r) => r.method === 'GET' && r.url === '/api/assignments/21')).flush(
      assignmentDetail({ myStatus: 'returned', myAttempts: [attempt({ review: { id: 3, decision: 'returned', score: 60, suggestedScore: 50, comment: 'R2 again, please.', remeasureKeys: ['tp-r2'], reviewer: null, createdAt: '2026-11-30T14:00:00Z' } })] }),
    );
    await settle();
    const banner = el.querySelector('[data-test="remeasure"]')!;
    expect(banner.textContent).toContain('re-measure 1 test point');
    expect(Array.from(banner.querySelectorAll('[data-requested]')).map((b) => b.getAttribute('data-requested'))).toEqual(['tp-r2']);
    expect(banner.querySelector('[data-requested]')!.textContent).toContain('R2');
    expect(banner.querySelector('a[data-test="review-link"]')!.getAttribute('href')).toBe('/attempts/41/review');

    // The others are read-only and marked.
    expect(input('tp-r1').readOnly).toBeTrue();
    expect(row('tp-r1').classList).toContain('locked');
    expect(row('tp-r1').querySelector('[data-test="locked"]')).not.toBeNull();
    input('tp-r1').focus();
    expect(press(input('tp-r1'), 'o').defaultPrevented).toBeFalse();
    type('tp-r1', '9M');
    await settle();
    expect(http.match((r) => r.method === 'POST').length).toBe(0);
    expect(row('tp-r1').querySelector('[role="alert"]')!.textContent).toContain('re-measure');

    // The requested point: the banner's button takes the focus there; its new reading follows the submitted one.
    (banner.querySelector('[data-requested="tp-r2"]') as HTMLButtonElement).click();
    await settle();
    expect(document.activeElement).toBe(input('tp-r2'));
    expect(input('tp-r2').readOnly).toBeFalse();
    expect(row('tp-r2').classList).not.toContain('locked');
    type('tp-r2', '255k');
    const req = await postedReading();
    const body = req.request.body as ReadingInput;
    expect(body.text).toBe('255k');
    expect(body.followsReadingId).toBe(r2.id);
    req.flush(savedAnswer(view, record('tp-r2', '255k', { clientKey: body.clientKey, followsReadingId: r2.id, takenAt: '2026-12-01T09:00:00Z' })), { status: 201, statusText: 'Created' });
    await settle();
    expect(row('tp-r2').querySelector('.current')!.textContent).toContain('255k');
    // Submitting again: the dialog no longer names R2 as not re-measured (before, it did: see below).
    el.querySelector<HTMLButtonElement>('[data-test="submit"]')!.click();
    await settle();
    expect(el.querySelector('[data-test="submit"]')!.textContent).toContain('Submit again');
    expect(dialog()!.querySelector('[data-test="submit-remeasure-left"]')).toBeNull();
    expect(dialog()!.textContent).toContain('Attempt 2');
  });

  it('returned: the Submit dialog names requested points not re-measured since the submission', async () => {
    const r2 = record('tp-r2', '330k', { takenAt: '2026-11-30T09:06:00Z' });
    const view = classSurveyView({ remeasureKeys: ['tp-r2'], attemptCount: 1 }, { state: 'returned' }, { readings: [r2] });
    await open(view);
    (await nextRequest(http, (r) => r.method === 'GET' && r.url === '/api/assignments/21')).flush(assignmentDetail({ myStatus: 'returned', myAttempts: [attempt()] }));
    await settle();
    el.querySelector<HTMLButtonElement>('[data-test="submit"]')!.click();
    await settle();
    expect(dialog()!.querySelector('[data-test="submit-remeasure-left"]')!.textContent).toContain('R2');
    expect(dialog()!.querySelector('[data-test="submit-confirm"]')!.textContent).toContain('Submit anyway');
  });

  it('Submit: a dialog names the unread points; "Not yet" sends nothing; confirmed, the survey is read-only with a link to the submission', async () => {
    const r2 = record('tp-r2', '260k');
    const view = classSurveyView({}, {}, { readings: [r2] });
    await open(view);
    el.querySelector<HTMLButtonElement>('[data-test="submit"]')!.click();
    await settle();
    const unread = dialog()!.querySelector('[data-test="submit-unread"]')!.textContent!;
    expect(unread).toContain('3 test points are unread');
    expect(unread).toContain('R1');
    expect(unread).toContain('R3');
    expect(unread).not.toContain('R2');
    expect(dialog()!.querySelector('[data-test="submit-confirm"]')!.textContent!.trim()).toBe('Submit anyway');
    Array.from(dialog()!.querySelectorAll('button')).find((b) => b.textContent!.includes('Not yet'))!.click();
    expect(await dialogGone()).toBeTrue();
    expect(http.match((r) => r.url.endsWith('/submit')).length).toBe(0);

    el.querySelector<HTMLButtonElement>('[data-test="submit"]')!.click();
    await settle();
    dialog()!.querySelector<HTMLButtonElement>('[data-test="submit-confirm"]')!.click();
    const post = await nextRequest(http, (r) => r.method === 'POST' && r.url === '/api/surveys/5/submit');
    post.flush(attempt({ id: 41, number: 1 }));
    const done = classSurveyView({ attemptCount: 1 }, { state: 'submitted', editable: false }, { readings: [r2] });
    (await nextRequest(http, (r) => r.method === 'GET' && r.url === '/api/surveys/5')).flush(done);
    await settle();
    expect(text('[data-test="survey-state"]')).toBe('submitted');
    expect(el.querySelector('[data-test="submit"]')).toBeNull();
    expect(input('tp-r1').readOnly).toBeTrue();
    expect(text('[data-test="submitted-readonly"]')).toContain('read-only');
    expect(el.querySelector('[data-test="review-link"]')!.getAttribute('href')).toBe('/attempts/41/review');
  });

  it('Submit with every test point read: the dialog says so and offers a plain Submit', async () => {
    const readings = [record('tp-r1', '10M'), record('tp-r2', '260k'), record('tp-v1p', '255k'), record('tp-r3', '1k2')];
    await open(classSurveyView({}, {}, { readings }));
    el.querySelector<HTMLButtonElement>('[data-test="submit"]')!.click();
    await settle();
    expect(dialog()!.querySelector('[data-test="submit-all-read"]')).not.toBeNull();
    expect(dialog()!.querySelector('[data-test="submit-unread"]')).toBeNull();
    expect(dialog()!.querySelector('[data-test="submit-confirm"]')!.textContent!.trim()).toBe('Submit');
    expect(dialog()!.textContent).toContain('Attempt 1');
  });

  it('Submit needs the server: unreachable, it is not queued and says so; the survey stays open', async () => {
    const r2 = record('tp-r2', '260k');
    const view = classSurveyView({}, {}, { readings: [r2] });
    await open(view);
    el.querySelector<HTMLButtonElement>('[data-test="submit"]')!.click();
    await settle();
    dialog()!.querySelector<HTMLButtonElement>('[data-test="submit-confirm"]')!.click();
    const post = await nextRequest(http, (r) => r.method === 'POST' && r.url === '/api/surveys/5/submit');
    post.error(new ProgressEvent('error'), { status: 0, statusText: 'Unknown Error' });
    await settle();
    expect(text('[data-test="submit-message"]')).toContain('Not submitted');
    expect(text('[data-test="submit-offline"]')).toContain('needs the server');
    expect(el.querySelector<HTMLButtonElement>('[data-test="submit"]')!.disabled).toBeFalse();
    expect(input('tp-r1').readOnly).toBeFalse();
    // Nothing waits to be sent: a submission is never put in the outbox.
    expect(el.querySelector('[data-test="waiting"]')).toBeNull();

    // Its twin: the server answers the next try.
    el.querySelector<HTMLButtonElement>('[data-test="submit"]')!.click();
    await settle();
    dialog()!.querySelector<HTMLButtonElement>('[data-test="submit-confirm"]')!.click();
    (await nextRequest(http, (r) => r.method === 'POST' && r.url === '/api/surveys/5/submit')).flush(attempt());
    (await nextRequest(http, (r) => r.method === 'GET' && r.url === '/api/surveys/5')).flush(classSurveyView({ attemptCount: 1 }, { state: 'submitted', editable: false }, { readings: [r2] }));
    await settle();
    expect(el.querySelector('[data-test="submit-message"]')).toBeNull();
    expect(text('[data-test="survey-state"]')).toBe('submitted');
  });

  it('offline from this browser’s copy: keying goes on, and Submit says it needs the server', async () => {
    const view = classSurveyView();
    await open(view);
    await copyKept();
    fixture.destroy();
    await open('away');
    expect(text('[data-test="submit-offline"]')).toContain('needs the server');
    spyOnProperty(navigator, 'onLine').and.returnValue(false);
    el.querySelector<HTMLButtonElement>('[data-test="submit"]')!.click();
    await settle();
    expect(dialog()).toBeNull();
    expect(text('[data-test="submit-message"]')).toContain('offline');
    expect(http.match((r) => r.url.endsWith('/submit')).length).toBe(0);
  });

  it('an instructor reads a student’s survey read-only, with verdicts and a link to the review', async () => {
    const stored = record('tp-r2', '330k');
    const view = classSurveyView({ viewer: 'instructor', showVerdicts: false, predictFirst: true, attemptCount: 2 }, { state: 'submitted', editable: false, startedBy: { id: 12, name: 'Cleo Marsh' } }, { readings: [stored] });
    await open(view);
    const get = await nextRequest(http, (r) => r.method === 'GET' && r.url === '/api/assignments/21');
    get.flush(
      assignmentDetail({
        myStatus: null,
        mySurveyId: null,
        queue: [
          { student: { id: 13, name: 'Dev Okafor' }, surveyId: 6, status: 'submitted', latestAttempt: { id: 50, number: 1, submittedAt: '2026-11-30T10:00:00Z', late: false }, attemptCount: 1, score: null },
          { student: { id: 12, name: 'Cleo Marsh' }, surveyId: 5, status: 'submitted', latestAttempt: { id: 44, number: 2, submittedAt: '2026-11-30T11:00:00Z', late: false }, attemptCount: 2, score: null },
        ],
      }),
    );
    await settle();
    expect(text('[data-test="instructor-readonly"]')).toContain('Cleo Marsh’s survey: read-only');
    expect(el.querySelector('[data-test="review-link"]')!.getAttribute('href')).toBe('/attempts/44/review');
    expect(el.querySelector('[data-test="submit"]')).toBeNull();
    expect(input('tp-r1').readOnly).toBeTrue();
    // The student's options do not hide anything from the instructor.
    expect(verdictOf('tp-r2')).toBe('high');
    expect(row('tp-r1').querySelector('[data-test="concealed"]')).toBeNull();
  });
});
