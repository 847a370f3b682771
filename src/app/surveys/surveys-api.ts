import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { Observable, map } from 'rxjs';
import type {
  AmendmentRecord,
  LiftedLeadRecord,
  MeterCheck,
  ReadingEdit,
  ReadingInput,
  ReadingSaved,
  SurveyView,
} from '@domain/set-format';
import type { AssignmentDetail, AttemptSummary } from '@domain/class-format';
import { callerHandles } from '../core/errors/api-error';

/** POST /api/surveys/:id/lifted-leads */
export interface LiftedLeadInput {
  componentKey: string;
  end: 0 | 1;
  promptedByReadingId: number | null;
  note: string;
}

/** POST /api/surveys/:id/amendments: a change to a complete survey, with its reason. */
export interface AmendmentInput {
  /** The reading changed; null (with `change.testPointKey`) adds a reading. */
  readingId: number | null;
  reason: string;
  change: Omit<ReadingEdit, 'version'> & { testPointKey?: string };
}

/** A save answered: 201 a new reading, 200 a replay of a client key already stored. */
export interface SavedAnswer {
  status: number;
  body: ReadingSaved;
}

/**
 * The survey grid's calls (api/surveys). Every call says the caller shows its own errors: the
 * grid keeps working offline and shows refusals beside the row, never in a snackbar.
 */
@Injectable({ providedIn: 'root' })
export class SurveysApi {
  private readonly http = inject(HttpClient);
  private readonly context = callerHandles();

  survey(id: number): Observable<SurveyView> {
    return this.http.get<SurveyView>(`/api/surveys/${id}`, { context: this.context });
  }

  saveReading(id: number, input: ReadingInput): Observable<SavedAnswer> {
    return this.http
      .post<ReadingSaved>(`/api/surveys/${id}/readings`, input, { context: this.context, observe: 'response' })
      .pipe(map((res) => ({ status: res.status, body: res.body as ReadingSaved })));
  }

  editReading(id: number, readingId: number, edit: ReadingEdit): Observable<ReadingSaved> {
    return this.http.patch<ReadingSaved>(`/api/surveys/${id}/readings/${readingId}`, edit, { context: this.context });
  }

  meterCheck(id: number, text: string): Observable<MeterCheck> {
    return this.http.post<MeterCheck>(`/api/surveys/${id}/meter-check`, { text }, { context: this.context });
  }

  complete(id: number): Observable<unknown> {
    return this.http.post<unknown>(`/api/surveys/${id}/complete`, {}, { context: this.context });
  }

  /** A class survey handed in: the attempt frozen on the server (never queued offline). */
  submit(id: number): Observable<AttemptSummary> {
    return this.http.post<AttemptSummary>(`/api/surveys/${id}/submit`, {}, { context: this.context });
  }

  /** A class survey's assignment: the student's attempts (myAttempts) or, for its instructor, the queue. */
  assignment(id: number): Observable<AssignmentDetail> {
    return this.http.get<AssignmentDetail>(`/api/assignments/${id}`, { context: this.context });
  }

  amend(id: number, body: AmendmentInput): Observable<AmendmentRecord> {
    return this.http.post<AmendmentRecord>(`/api/surveys/${id}/amendments`, body, { context: this.context });
  }

  jointCheck(id: number, testPointKey: string, checked: boolean): Observable<unknown> {
    return this.http.post<unknown>(`/api/surveys/${id}/joint-checks`, { testPointKey, checked }, { context: this.context });
  }

  liftLead(id: number, body: LiftedLeadInput): Observable<LiftedLeadRecord> {
    return this.http.post<LiftedLeadRecord>(`/api/surveys/${id}/lifted-leads`, body, { context: this.context });
  }
}
