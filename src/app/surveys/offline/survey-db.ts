import { Injectable, InjectionToken, inject } from '@angular/core';
import { openDB, type DBSchema, type IDBPDatabase } from 'idb';
import type { ReadingInput, SurveyView } from '@domain/set-format';
import type { LiftedLeadInput } from '../surveys-api';

/** The IndexedDB database name (specs give each test its own). */
export const SURVEY_DB_NAME = new InjectionToken<string>('SURVEY_DB_NAME', { providedIn: 'root', factory: () => 'driftmark-surveys' });

/** One write waiting for the API, in the order it was made at the bench. */
export type OutboxOp =
  | {
      kind: 'reading';
      input: ReadingInput;
      /** A follow-up of a reading still waiting here: resolved to its id when this one is sent. */
      followsClientKey: string | null;
    }
  | {
      kind: 'lifted-lead';
      clientKey: string;
      body: LiftedLeadInput;
      /** The prompting reading, when it was still waiting when the lead was lifted. */
      promptedByClientKey: string | null;
    }
  | { kind: 'joint-check'; clientKey: string; testPointKey: string; checked: boolean };

export interface OutboxItem {
  /** Order of the bench: later writes have larger numbers. */
  seq: number;
  surveyId: number;
  op: OutboxOp;
  queuedAt: string;
  /** The API refused this write (not a network failure): kept and shown until discarded. */
  refused: { status: number; message: string } | null;
}

export interface CachedView {
  surveyId: number;
  view: SurveyView;
  savedAt: string;
  /** Leads lifted on rows whose follow-up reading is not keyed yet (the API's view does not carry them). */
  lifts?: [string, { end: 0 | 1; followsReadingId: number | null; followsClientKey: string | null } | null][];
  /** Predict-first class surveys: predictions typed on rows whose measured value is not keyed yet (test point key, text). */
  predictions?: [string, string][];
}

interface OfflineSchema extends DBSchema {
  views: { key: number; value: CachedView };
  outbox: { key: number; value: OutboxItem; indexes: { bySurvey: number } };
}

/** The client key of any outbox op. */
export function opKey(op: OutboxOp): string {
  return op.kind === 'reading' ? op.input.clientKey : op.clientKey;
}

let lastSeq = 0;
/** A sequence number larger than any made before in this tab and (by the clock) in earlier sessions. */
export function nextSeq(): number {
  lastSeq = Math.max(Date.now() * 1000, lastSeq + 1);
  return lastSeq;
}

/**
 * The grid's offline store (DESIGN.md §4 "Offline", issue #5 item 4): the SurveyView per survey
 * (so a reload with the API away still shows the grid and computes verdicts) and the outbox of
 * writes per survey in bench order. Both survive a reload and a browser restart. Where IndexedDB
 * cannot be opened (a locked-down private window) it keeps them in memory and says so
 * (`durable` false).
 */
@Injectable({ providedIn: 'root' })
export class SurveyDb {
  private readonly name = inject(SURVEY_DB_NAME);
  private db: Promise<IDBPDatabase<OfflineSchema> | null> | null = null;
  private readonly memViews = new Map<number, CachedView>();
  private readonly memOutbox = new Map<number, OutboxItem>();
  durable = true;

  private open(): Promise<IDBPDatabase<OfflineSchema> | null> {
    this.db ??= openDB<OfflineSchema>(this.name, 1, {
      upgrade(db) {
        db.createObjectStore('views', { keyPath: 'surveyId' });
        const outbox = db.createObjectStore('outbox', { keyPath: 'seq' });
        outbox.createIndex('bySurvey', 'surveyId');
      },
    }).catch(() => {
      this.durable = false;
      return null;
    });
    return this.db;
  }

  async view(surveyId: number): Promise<CachedView | undefined> {
    const db = await this.open();
    return db ? db.get('views', surveyId) : this.memViews.get(surveyId);
  }

  async putView(view: SurveyView, lifts: CachedView['lifts'] = [], predictions: CachedView['predictions'] = []): Promise<void> {
    const entry: CachedView = { surveyId: view.survey.id, view, savedAt: new Date().toISOString(), lifts, predictions };
    const db = await this.open();
    if (db) await db.put('views', entry);
    else this.memViews.set(entry.surveyId, entry);
  }

  /** The survey's waiting writes, oldest first. */
  async outbox(surveyId: number): Promise<OutboxItem[]> {
    const db = await this.open();
    const items = db ? await db.getAllFromIndex('outbox', 'bySurvey', surveyId) : [...this.memOutbox.values()].filter((i) => i.surveyId === surveyId);
    return items.sort((a, b) => a.seq - b.seq);
  }

  async add(item: OutboxItem): Promise<void> {
    const db = await this.open();
    if (db) await db.put('outbox', item);
    else this.memOutbox.set(item.seq, item);
  }

  async put(item: OutboxItem): Promise<void> {
    return this.add(item);
  }

  async remove(seq: number): Promise<void> {
    const db = await this.open();
    if (db) await db.delete('outbox', seq);
    else this.memOutbox.delete(seq);
  }

  /** Closes the connection (specs delete their database afterwards). */
  async close(): Promise<void> {
    const db = await this.open();
    db?.close();
    this.db = null;
  }
}
