import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import type { ReadingConflict, ReadingInput } from '@domain/set-format';
import { nextRequest, nextTask } from '../../../testing/http-testing';
import { SurveysApi } from '../surveys-api';
import { record, savedAnswer, surveyView } from '../testing/survey-fixtures';
import { newClientKey } from './client-key';
import { OutboxSender, type SentResult } from './outbox-sender';
import { SURVEY_DB_NAME, SurveyDb, nextSeq, type OutboxItem } from './survey-db';

describe('OutboxSender', () => {
  let http: HttpTestingController;
  let db: SurveyDb;
  let sender: OutboxSender;
  let dbName: string;
  let sent: { item: OutboxItem; result: SentResult }[];
  let refused: { item: OutboxItem; conflict: ReadingConflict | null }[];
  let away: boolean[];
  const view = surveyView();

  beforeEach(() => {
    dbName = `driftmark-spec-${Math.random().toString(36).slice(2)}`;
    TestBed.configureTestingModule({ providers: [provideHttpClient(), provideHttpClientTesting(), { provide: SURVEY_DB_NAME, useValue: dbName }] });
    http = TestBed.inject(HttpTestingController);
    db = TestBed.inject(SurveyDb);
    sent = [];
    refused = [];
    away = [];
    sender = new OutboxSender(5, db, TestBed.inject(SurveysApi), {
      readingIdOf: (key) => {
        for (const s of sent) if (s.result.kind === 'reading' && s.result.saved.body.reading.clientKey === key) return s.result.saved.body.reading.id;
        return null;
      },
      sent: (item, result) => sent.push({ item, result }),
      refused: (item, conflict) => refused.push({ item, conflict }),
      unreachable: (a) => away.push(a),
    });
  });

  afterEach(async () => {
    sender.dispose();
    http.verify();
    await db.close();
    indexedDB.deleteDatabase(dbName);
  });

  async function queue(testPointKey: string, text: string, followsClientKey: string | null = null): Promise<OutboxItem> {
    const item: OutboxItem = { seq: nextSeq(), surveyId: 5, op: { kind: 'reading', input: { testPointKey, clientKey: newClientKey(), text }, followsClientKey }, queuedAt: new Date().toISOString(), refused: null };
    await db.add(item);
    return item;
  }

  const post = () => nextRequest(http, (r) => r.method === 'POST' && r.url === '/api/surveys/5/readings');
  const bodyOf = (req: { request: { body: unknown } }) => req.request.body as ReadingInput;
  const answer = (input: ReadingInput, over: Parameters<typeof record>[2] = {}) => savedAnswer(view, record(input.testPointKey, input.text!, { clientKey: input.clientKey, ...over }));

  it('sends one write at a time, oldest first, and removes each only when the API has answered', async () => {
    const a = await queue('tp-r1', '10M');
    const b = await queue('tp-r2', '260k');
    const c = await queue('tp-v1p', '250k');
    const done = sender.flush();
    const first = await post();
    expect(bodyOf(first)).toEqual(a.op.kind === 'reading' ? a.op.input : ({} as ReadingInput));
    // Only one request in flight: the second waits for the first answer.
    expect(http.match((r) => r.method === 'POST').length).toBe(0);
    expect((await db.outbox(5)).length).toBe(3);
    first.flush(answer(bodyOf(first)), { status: 201, statusText: 'Created' });
    const second = await post();
    expect(bodyOf(second).clientKey).toBe(b.op.kind === 'reading' ? b.op.input.clientKey : '');
    second.flush(answer(bodyOf(second)), { status: 201, statusText: 'Created' });
    const third = await post();
    expect(bodyOf(third).clientKey).toBe(c.op.kind === 'reading' ? c.op.input.clientKey : '');
    third.flush(answer(bodyOf(third)), { status: 201, statusText: 'Created' });
    await done;
    expect(sent.map((s) => s.item.seq)).toEqual([a.seq, b.seq, c.seq]);
    expect(await db.outbox(5)).toEqual([]);
  });

  it('stops at a network failure keeping everything, then resends the same client key; a 200 replay counts as sent', async () => {
    const a = await queue('tp-r1', '10M');
    const b = await queue('tp-r2', '260k');
    const round = sender.flush();
    const failed = await post();
    const key = bodyOf(failed).clientKey;
    failed.error(new ProgressEvent('error'), { status: 0, statusText: 'Unknown Error' });
    await round;
    expect(away).toEqual([true]);
    expect((await db.outbox(5)).map((i) => i.seq)).toEqual([a.seq, b.seq]);
    expect(http.match(() => true).length).toBe(0);

    // The browser is back online: the same write again, same client key. The API had stored it
    // (the answer was lost after the commit): 200, replayed — sent, not duplicated.
    window.dispatchEvent(new Event('online'));
    const again = await post();
    expect(bodyOf(again).clientKey).toBe(key);
    again.flush({ ...answer(bodyOf(again)), replayed: true }, { status: 200, statusText: 'OK' });
    const next = await post();
    next.flush(answer(bodyOf(next)), { status: 201, statusText: 'Created' });
    await nextTask(50);
    expect(sent.length).toBe(2);
    expect(sent[0].result.kind === 'reading' && sent[0].result.saved.status).toBe(200);
    expect(sent[1].result.kind === 'reading' && sent[1].result.saved.status).toBe(201);
    expect(away[away.length - 1]).toBeFalse();
    expect(await db.outbox(5)).toEqual([]);
  });

  it('keeps the write queued on a 503 from an API whose database is down, and sends it once when it answers again', async () => {
    const a = await queue('tp-r1', '10M');
    const b = await queue('tp-r2', '260k');
    const round = sender.flush();
    const failed = await post();
    const key = bodyOf(failed).clientKey;
    // What api/http/errors.ts answers while PostgreSQL is unreachable (the error shape, Retry-After).
    failed.flush(
      { error: { code: 'database-unavailable', message: 'The database cannot be reached just now. Nothing was saved by this request; try again in a moment.' } },
      { status: 503, statusText: 'Service Unavailable', headers: { 'Retry-After': '5' } },
    );
    await round;
    expect(away).toEqual([true]);
    expect(refused).toEqual([]);
    expect((await db.outbox(5)).map((i) => [i.seq, i.refused])).toEqual([
      [a.seq, null],
      [b.seq, null],
    ]);
    expect(http.match(() => true).length).toBe(0);

    // The next retry (here: back online) sends the same write, then the next, each once.
    window.dispatchEvent(new Event('online'));
    const again = await post();
    expect(bodyOf(again).clientKey).toBe(key);
    again.flush(answer(bodyOf(again)), { status: 201, statusText: 'Created' });
    const next = await post();
    next.flush(answer(bodyOf(next)), { status: 201, statusText: 'Created' });
    await nextTask(50);
    expect(sent.map((s) => s.item.seq)).toEqual([a.seq, b.seq]);
    expect(away[away.length - 1]).toBeFalse();
    expect(await db.outbox(5)).toEqual([]);
  });

  it('keeps a refused write aside with the API’s message and goes on with the next', async () => {
    const bad = await queue('tp-r1', '10M');
    const good = await queue('tp-r2', '260k');
    const done = sender.flush();
    const first = await post();
    first.flush({ error: { code: 'survey-not-draft', message: 'The survey is complete: add an amendment.' } }, { status: 409, statusText: 'Conflict' });
    const second = await post();
    expect(bodyOf(second).testPointKey).toBe('tp-r2');
    second.flush(answer(bodyOf(second)), { status: 201, statusText: 'Created' });
    await done;
    expect(refused.length).toBe(1);
    expect(refused[0].item.seq).toBe(bad.seq);
    expect(refused[0].item.refused).toEqual({ status: 409, message: 'The survey is complete: add an amendment.' });
    expect(sent.map((s) => s.item.seq)).toEqual([good.seq]);
    const left = await db.outbox(5);
    expect(left.map((i) => i.seq)).toEqual([bad.seq]);
    expect(left[0].refused?.status).toBe(409);
  });

  it('a follow-up of a reading that waited with it is sent with that reading’s new id', async () => {
    const prompting = await queue('tp-r2', '120k');
    const promptingKey = prompting.op.kind === 'reading' ? prompting.op.input.clientKey : '';
    await queue('tp-r2', '250k', promptingKey);
    const done = sender.flush();
    const first = await post();
    first.flush(answer(bodyOf(first), { id: 4242 }), { status: 201, statusText: 'Created' });
    const second = await post();
    expect(bodyOf(second).followsReadingId).toBe(4242);
    second.flush(answer(bodyOf(second)), { status: 201, statusText: 'Created' });
    await done;
  });
});
