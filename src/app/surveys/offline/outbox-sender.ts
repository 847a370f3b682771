import { HttpErrorResponse } from '@angular/common/http';
import { firstValueFrom } from 'rxjs';
import type { LiftedLeadRecord, ReadingConflict, ReadingInput } from '@domain/set-format';
import { apiErrorOf } from '../../core/errors/api-error';
import type { SavedAnswer, SurveysApi } from '../surveys-api';
import type { OutboxItem, SurveyDb } from './survey-db';

/** What the API answered for one write of the outbox. */
export type SentResult =
  | { kind: 'reading'; saved: SavedAnswer }
  | { kind: 'lifted-lead'; lead: LiftedLeadRecord }
  | { kind: 'joint-check' };

export interface SenderHooks {
  /** The stored reading id of a client key (a reading sent earlier), or null. */
  readingIdOf(clientKey: string): number | null;
  sent(item: OutboxItem, result: SentResult): void;
  refused(item: OutboxItem, conflict: ReadingConflict | null): void;
  /** True while the API cannot be reached (network error, 5xx, 429, or an expired session). */
  unreachable(away: boolean): void;
}

/** First retry after a failed send; doubled up to the ceiling. */
export const RETRY_FIRST_MS = 1000;
export const RETRY_MAX_MS = 30000;

/** A failure that says "try again later" rather than "this write is wrong". */
export function isTransient(err: unknown): boolean {
  if (!(err instanceof HttpErrorResponse)) return true;
  return err.status === 0 || err.status === 401 || err.status === 408 || err.status === 429 || err.status >= 500;
}

/**
 * Sends a survey's outbox to the API strictly in bench order (issue #5 item 4): one write at a
 * time, the oldest first; a write leaves the outbox only when the API has answered for it (201
 * new, or 200 when its client key was already stored — a replay counts as sent). A network
 * failure stops the round and retries with backoff, and at once when the browser comes back
 * online; a refusal (400, 404, 409…) is kept aside and shown, and the writes after it go on.
 */
export class OutboxSender {
  private running: Promise<void> | null = null;
  private again = false;
  private timer: ReturnType<typeof setTimeout> | null = null;
  private delay = RETRY_FIRST_MS;
  private disposed = false;
  private readonly online = (): void => {
    this.delay = RETRY_FIRST_MS;
    void this.flush();
  };

  constructor(
    private readonly surveyId: number,
    private readonly db: SurveyDb,
    private readonly api: SurveysApi,
    private readonly hooks: SenderHooks,
  ) {
    if (typeof window !== 'undefined') window.addEventListener('online', this.online);
  }

  /** Sends what waits; resolves when the outbox is empty of sendable writes or the API is away. */
  flush(): Promise<void> {
    if (this.disposed) return Promise.resolve();
    if (this.running) {
      this.again = true;
      return this.running;
    }
    if (this.timer !== null) {
      clearTimeout(this.timer);
      this.timer = null;
    }
    this.running = this.round().finally(() => {
      this.running = null;
      if (this.again && !this.disposed && this.timer === null) {
        this.again = false;
        void this.flush();
      }
    });
    return this.running;
  }

  dispose(): void {
    this.disposed = true;
    if (this.timer !== null) clearTimeout(this.timer);
    if (typeof window !== 'undefined') window.removeEventListener('online', this.online);
  }

  private async round(): Promise<void> {
    for (;;) {
      if (this.disposed) return;
      this.again = false;
      const next = (await this.db.outbox(this.surveyId)).find((i) => i.refused === null);
      if (next === undefined) return;
      try {
        const result = await this.send(next);
        await this.db.remove(next.seq);
        this.delay = RETRY_FIRST_MS;
        this.hooks.unreachable(false);
        this.hooks.sent(next, result);
      } catch (err: unknown) {
        if (isTransient(err)) {
          // Writes queued meanwhile change nothing: the oldest one still waits for the API.
          this.again = false;
          this.hooks.unreachable(true);
          this.retryLater();
          return;
        }
        const e = apiErrorOf(err);
        const refused: OutboxItem = { ...next, refused: { status: e.status, message: e.message } };
        await this.db.put(refused);
        this.hooks.refused(refused, conflictOf(err));
      }
    }
  }

  private retryLater(): void {
    if (this.disposed || this.timer !== null) return;
    const wait = this.delay;
    this.delay = Math.min(RETRY_MAX_MS, this.delay * 2);
    this.timer = setTimeout(() => {
      this.timer = null;
      void this.flush();
    }, wait);
  }

  private async send(item: OutboxItem): Promise<SentResult> {
    const op = item.op;
    switch (op.kind) {
      case 'reading': {
        let input: ReadingInput = op.input;
        if (op.followsClientKey !== null && (input.followsReadingId ?? null) === null) {
          input = { ...input, followsReadingId: this.hooks.readingIdOf(op.followsClientKey) };
        }
        return { kind: 'reading', saved: await firstValueFrom(this.api.saveReading(this.surveyId, input)) };
      }
      case 'lifted-lead': {
        let body = op.body;
        if (op.promptedByClientKey !== null && body.promptedByReadingId === null) {
          body = { ...body, promptedByReadingId: this.hooks.readingIdOf(op.promptedByClientKey) };
        }
        return { kind: 'lifted-lead', lead: await firstValueFrom(this.api.liftLead(this.surveyId, body)) };
      }
      case 'joint-check':
        await firstValueFrom(this.api.jointCheck(this.surveyId, op.testPointKey, op.checked));
        return { kind: 'joint-check' };
    }
  }
}

/** The 409 details of a stale edit (both values), when the error carries them. */
export function conflictOf(err: unknown): ReadingConflict | null {
  if (!(err instanceof HttpErrorResponse) || err.status !== 409) return null;
  const body = err.error as { error?: { details?: unknown } } | null;
  const d = body?.error?.details as Partial<ReadingConflict> | undefined;
  return d && typeof d === 'object' && d.current && d.yours ? (d as ReadingConflict) : null;
}
