import { TestBed } from '@angular/core/testing';
import { surveyView } from '../testing/survey-fixtures';
import { newClientKey } from './client-key';
import { SURVEY_DB_NAME, SurveyDb, nextSeq, type OutboxItem } from './survey-db';

describe('SurveyDb', () => {
  let dbName: string;

  beforeEach(() => {
    dbName = `driftmark-spec-${Math.random().toString(36).slice(2)}`;
  });

  afterEach(() => {
    indexedDB.deleteDatabase(dbName);
  });

  /** A fresh store on the same database, as after a reload or a browser restart. */
  function freshStore(): SurveyDb {
    TestBed.resetTestingModule();
    TestBed.configureTestingModule({ providers: [{ provide: SURVEY_DB_NAME, useValue: dbName }] });
    return TestBed.inject(SurveyDb);
  }

  const item = (surveyId: number, testPointKey: string, text: string): OutboxItem => ({
    seq: nextSeq(),
    surveyId,
    op: { kind: 'reading', input: { testPointKey, clientKey: newClientKey(), text }, followsClientKey: null },
    queuedAt: new Date().toISOString(),
    refused: null,
  });

  it('keeps the view and the outbox across a new connection, each survey’s writes in bench order', async () => {
    const first = freshStore();
    const a = item(5, 'tp-r1', '10M');
    const other = item(6, 'tp-r1', '9M1');
    const b = item(5, 'tp-r2', '260k');
    const c = item(5, 'tp-v1p', '250k');
    // Stored out of order on purpose: the outbox answers by sequence.
    await first.add(c);
    await first.add(a);
    await first.add(other);
    await first.add(b);
    await first.putView(surveyView());
    await first.close();

    const second = freshStore();
    expect((await second.outbox(5)).map((i) => i.seq)).toEqual([a.seq, b.seq, c.seq]);
    expect((await second.outbox(6)).map((i) => i.seq)).toEqual([other.seq]);
    expect((await second.view(5))?.view.set.label).toBe('Kitchen Wren');
    expect(await second.view(6)).toBeUndefined();
    await second.remove(b.seq);
    expect((await second.outbox(5)).map((i) => i.seq)).toEqual([a.seq, c.seq]);
    expect(second.durable).toBeTrue();
    await second.close();
  });

  it('keeps a class survey’s typed predictions with its copy across a new connection; a later copy without them drops them', async () => {
    const first = freshStore();
    await first.putView(surveyView(), [], [['tp-r2', '240k']]);
    await first.close();
    const second = freshStore();
    expect((await second.view(5))?.predictions).toEqual([['tp-r2', '240k']]);
    await second.putView(surveyView(), []);
    expect((await second.view(5))?.predictions).toEqual([]);
    await second.close();
  });

  it('numbers writes in the order they are made', () => {
    const seqs = [nextSeq(), nextSeq(), nextSeq()];
    expect(seqs[0]).toBeLessThan(seqs[1]);
    expect(seqs[1]).toBeLessThan(seqs[2]);
  });
});

describe('newClientKey', () => {
  it('makes 22 url-safe characters the API accepts (16–64 of [A-Za-z0-9_-]), different each time', () => {
    const keys = new Set(Array.from({ length: 200 }, () => newClientKey()));
    expect(keys.size).toBe(200);
    for (const k of keys) expect(k).toMatch(/^[A-Za-z0-9_-]{22}$/);
    expect(newClientKey(40)).toMatch(/^[A-Za-z0-9_-]{40}$/);
  });
});
