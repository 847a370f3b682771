import { HttpClient, HttpErrorResponse, HttpParams, HttpResponse } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { Observable, map } from 'rxjs';
import type {
  BringUpEntry,
  BringUpStep,
  JobStatus,
  LiftedLeadRecord,
  NewPart,
  PartsAction,
  PartsRecordLine,
  PersonRef,
  SetDetail,
  SetInput,
  SetSummary,
  SurveyStart,
  SurveySummary,
  SurveyView,
  TubeStatus,
  VerdictCounts,
} from '@domain/set-format';
import type { GateItemState, GatesView as DomainGatesView } from '@domain/gates';
import type { CompareRow, PartInstance } from '@domain/part-history';
import type { ReplacementList } from '@domain/replacement-list';
import type { SurveyPurpose, Verdict } from '@domain/words';
import { callerHandles } from '../core/errors/api-error';

// ---------------------------------------------------------------------------------------------
// Answers of the "after the survey" routes (helper B's api/records/). Until set-format.ts holds
// them, the app reads them as declared here; every field the screens do not need is optional.

export interface SetPage {
  readonly items: readonly SetSummary[];
  readonly total: number;
  readonly page: number;
  readonly pageSize: number;
}

export interface SetQuery {
  readonly q?: string;
  readonly status?: JobStatus | '';
  /** 1-based. */
  readonly page: number;
  readonly pageSize: number;
}

/** One checklist item of the set's safety gates with its newest record (api/domain/gates.ts). */
export type GateItem = GateItemState<PersonRef | null>;

/** GET /api/sets/:id/gates (api/domain/gates.ts). */
export type GatesView = DomainGatesView<PersonRef | null, LiftedLeadRecord>;

/** GET /api/sets/:id/replacements (api/domain/replacement-list.ts, with the survey it is drawn from). */
export interface ReplacementsView extends ReplacementList {
  readonly setId?: number;
  readonly survey?: { readonly id: number; readonly purpose: string; readonly state: string; readonly startedAt: string } | null;
}

/** GET /api/sets/:id/history: each part instance across the set's surveys (api/domain/part-history.ts). */
export interface SetHistory {
  readonly parts: readonly PartInstance[];
}

/** GET /api/sets/:id/compare?a=&b= (api/domain/part-history.ts `compareRows`). */
export interface SurveyCompare {
  readonly a?: SurveySummary;
  readonly b?: SurveySummary;
  readonly rows: readonly CompareRow[];
}

/** GET /api/sets/:id/record: everything the printable record shows. */
export interface SetRecordView {
  readonly set: SetDetail;
  /** Each survey as the grid reads it (readings, evaluations, amendments). */
  readonly surveys: readonly SurveyView[];
  readonly partsRecord: readonly PartsRecordLine[];
  readonly gates: GatesView;
  readonly liftedLeads: readonly LiftedLeadRecord[];
  readonly bringUp: readonly BringUpEntry[];
  readonly generatedAt?: string;
}

export interface ProvenanceLabel {
  readonly id: number;
  /** Null once revoked. */
  readonly token: string | null;
  /** Null once revoked, or while the instance has no PUBLIC_BASE_URL. */
  readonly url: string | null;
  readonly createdBy?: PersonRef | null;
  readonly createdAt: string;
  readonly revokedAt: string | null;
}

/** GET /api/public/labels/:token: read-only, without owner identity. */
export interface PublicRecord {
  readonly chassis: { readonly maker: string; readonly model: string; readonly chassisNumber: string; readonly yearFrom: number | null; readonly yearTo: number | null };
  readonly serial: string;
  readonly restorationLevel?: string;
  /** Complete surveys, oldest first; `date`: completed (else started). */
  readonly surveys: readonly { readonly purpose: SurveyPurpose; readonly state?: string; readonly date: string; readonly startedAt?: string; readonly completedAt?: string | null; readonly counts: VerdictCounts }[];
  /** `text`: the new part's value as recorded; `date`: when the line was recorded. */
  readonly partsReplaced: readonly { readonly ref: string; readonly text: string; readonly date: string }[];
  readonly firstPowerAt: string | null;
  /** Gate items signed: titles and dates only, no names. */
  readonly gatesSigned?: readonly { readonly title: string; readonly at: string }[];
  readonly notice?: string;
}

/** The new part as the API takes it (it parses the value texts itself). */
export type NewPartInput = Pick<NewPart, 'text' | 'uF' | 'watts' | 'volts' | 'kind' | 'measuredText'>;

export interface PartsLineInput {
  readonly componentKey: string;
  readonly action: PartsAction;
  readonly newPart?: NewPartInput | null;
  readonly readingId?: number | null;
  readonly reason?: string;
  readonly note?: string;
}

/** POST answer of a parts-record line: the line and the capacitor checks' findings. */
export interface PartsLineSaved {
  readonly line?: PartsRecordLine;
  readonly warnings?: readonly { readonly code?: string; readonly severity?: 'error' | 'warning'; readonly message: string }[];
}

export interface BringUpInput {
  readonly step: BringUpStep;
  readonly setting: string;
  readonly mainsVolts: number | null;
  readonly currentAmps: number | null;
  readonly bPlus: { node: string; volts: number }[];
  readonly observations: string[];
  readonly note: string;
}

export interface TubeRecordInput {
  readonly status: TubeStatus;
  readonly foundType: string;
  readonly testResult: string;
  readonly note: string;
}

export interface ExportFile {
  readonly filename: string;
  readonly text: string;
}

/** What a refused "ready for first power" (409) names: open gate items and open lifted leads. */
export function firstPowerReasons(err: unknown): string[] {
  if (!(err instanceof HttpErrorResponse)) return [];
  const details = (err.error as { error?: { details?: Record<string, unknown> } } | null)?.error?.details;
  if (!details) return [];
  const out: string[] = [];
  for (const value of Object.values(details)) {
    if (!Array.isArray(value)) continue;
    for (const v of value) out.push(reasonText(v));
  }
  return out.filter((s) => s !== '');
}

function reasonText(v: unknown): string {
  if (typeof v === 'string') return v;
  if (typeof v !== 'object' || v === null) return '';
  const r = v as Record<string, unknown>;
  if (typeof r['title'] === 'string') return `Gate item not signed: ${r['title']}`;
  if (typeof r['componentRef'] === 'string') return `Lifted lead not re-soldered: ${r['componentRef']}${typeof r['node'] === 'string' ? ' (end at ' + r['node'] + ')' : ''}`;
  if (typeof r['message'] === 'string') return r['message'];
  if (typeof r['key'] === 'string') return String(r['key']);
  return '';
}

/** Caller shows these statuses itself (forms and refusals). */
const formErrors = () => callerHandles(400, 409);
const enc = (s: string | number) => encodeURIComponent(String(s));

/** Every call of the sets, surveys-of-a-set and records API the set pages make. */
@Injectable({ providedIn: 'root' })
export class SetsApi {
  private readonly http = inject(HttpClient);

  list(query: SetQuery): Observable<SetPage> {
    let params = new HttpParams().set('page', query.page).set('pageSize', query.pageSize);
    if (query.q?.trim()) params = params.set('q', query.q.trim());
    if (query.status) params = params.set('status', query.status);
    return this.http.get<SetPage>('/api/sets', { params });
  }
  create(input: SetInput): Observable<SetDetail> {
    return this.http.post<SetDetail>('/api/sets', input, { context: formErrors() });
  }
  get(id: number): Observable<SetDetail> {
    return this.http.get<SetDetail>(`/api/sets/${id}`, { context: callerHandles(404) });
  }
  update(id: number, change: Partial<SetInput> & { version: number }): Observable<SetDetail> {
    return this.http.patch<SetDetail>(`/api/sets/${id}`, change, { context: formErrors() });
  }
  share(id: number, userIds: readonly number[]): Observable<unknown> {
    return this.http.put(`/api/sets/${id}/sharing`, { userIds }, { context: callerHandles(400, 403) });
  }
  saveTubeRecord(id: number, socketKey: string, input: TubeRecordInput): Observable<unknown> {
    return this.http.put(`/api/sets/${id}/tube-records/${enc(socketKey)}`, input, { context: formErrors() });
  }

  surveys(id: number): Observable<SurveySummary[]> {
    return this.http.get<unknown>(`/api/sets/${id}/surveys`).pipe(map((answer) => listIn<SurveySummary>(answer, 'items')));
  }
  startSurvey(id: number, start: SurveyStart): Observable<SurveyView> {
    return this.http.post<SurveyView>(`/api/sets/${id}/surveys`, start, { context: formErrors() });
  }

  /** The set's lifted leads (`{ items }` from the API). */
  liftedLeads(id: number): Observable<LiftedLeadRecord[]> {
    return this.http.get<unknown>(`/api/sets/${id}/lifted-leads`).pipe(map((answer) => listIn<LiftedLeadRecord>(answer, 'items')));
  }
  resolder(id: number, leadId: number, note: string, recheckReadingId: number | null = null): Observable<LiftedLeadRecord> {
    const body = recheckReadingId === null ? { note } : { note, recheckReadingId };
    return this.http.post<LiftedLeadRecord>(`/api/sets/${id}/lifted-leads/${leadId}/resolder`, body, { context: formErrors() });
  }

  gates(id: number): Observable<GatesView> {
    return this.http.get<GatesView>(`/api/sets/${id}/gates`);
  }
  signGate(id: number, itemKey: string, note: string): Observable<GatesView> {
    return this.http.post<GatesView>(`/api/sets/${id}/gates/${enc(itemKey)}/sign`, { note }, { context: formErrors() });
  }
  /** The note (why) is required. */
  reopenGate(id: number, itemKey: string, note: string): Observable<GatesView> {
    return this.http.post<GatesView>(`/api/sets/${id}/gates/${enc(itemKey)}/reopen`, { note }, { context: formErrors() });
  }
  /** 409 (nothing written) while a gate item or a lifted lead is open: see `firstPowerReasons`. */
  firstPower(id: number, note = ''): Observable<GatesView> {
    return this.http.post<GatesView>(`/api/sets/${id}/first-power`, { note }, { context: formErrors() });
  }

  /** The log, oldest step first (refused to add to before first power is recorded). */
  bringUp(id: number): Observable<BringUpEntry[]> {
    return this.http.get<unknown>(`/api/sets/${id}/bring-up`).pipe(map((answer) => listIn<BringUpEntry>(answer, 'entries')));
  }
  addBringUp(id: number, entry: BringUpInput): Observable<BringUpEntry> {
    return this.http.post<BringUpEntry>(`/api/sets/${id}/bring-up`, entry, { context: formErrors() });
  }

  /** The lines in the order written (the API also sends the newest per component). */
  partsRecord(id: number): Observable<PartsRecordLine[]> {
    return this.http.get<unknown>(`/api/sets/${id}/parts-record`).pipe(map((answer) => listIn<PartsRecordLine>(answer, 'lines')));
  }
  addPartsLine(id: number, line: PartsLineInput): Observable<PartsLineSaved> {
    return this.http.post<PartsLineSaved>(`/api/sets/${id}/parts-record`, line, { context: formErrors() });
  }

  replacements(id: number, surveyId?: number | null): Observable<ReplacementsView> {
    const params = surveyId ? new HttpParams().set('surveyId', surveyId) : undefined;
    return this.http.get<ReplacementsView>(`/api/sets/${id}/replacements`, { params });
  }
  replacementsCsv(id: number, surveyId?: number | null): Observable<ExportFile> {
    let params = new HttpParams().set('format', 'csv');
    if (surveyId) params = params.set('surveyId', surveyId);
    return this.http
      .get(`/api/sets/${id}/replacements`, { params, responseType: 'text', observe: 'response' })
      .pipe(map((res) => fileOf(res, `set-${id}-replacements.csv`)));
  }
  markReplacement(id: number, componentKey: string, marks: { ordered: boolean; received: boolean }): Observable<unknown> {
    return this.http.put(`/api/sets/${id}/replacements/${enc(componentKey)}/marks`, marks, { context: formErrors() });
  }

  history(id: number): Observable<SetHistory> {
    return this.http.get<unknown>(`/api/sets/${id}/history`).pipe(map((answer) => ({ parts: listIn<PartInstance>(answer, 'parts', 'instances') })));
  }
  compare(id: number, a: number, b: number): Observable<SurveyCompare> {
    return this.http
      .get<unknown>(`/api/sets/${id}/compare`, { params: new HttpParams().set('a', a).set('b', b), context: formErrors() })
      .pipe(map((answer) => ({ ...(Array.isArray(answer) ? {} : (answer as object)), rows: listIn<CompareRow>(answer, 'rows') })));
  }
  record(id: number): Observable<SetRecordView> {
    return this.http.get<SetRecordView>(`/api/sets/${id}/record`, { context: callerHandles(404) });
  }

  /** Newest first; a revoked label keeps its dates, not its token. */
  labels(id: number): Observable<ProvenanceLabel[]> {
    return this.http.get<unknown>(`/api/sets/${id}/labels`).pipe(map((answer) => listIn<ProvenanceLabel>(answer, 'labels')));
  }
  /** 409 `public-base-url-missing` while the instance has no PUBLIC_BASE_URL. */
  createLabel(id: number): Observable<ProvenanceLabel> {
    return this.http.post<ProvenanceLabel>(`/api/sets/${id}/labels`, {}, { context: formErrors() });
  }
  revokeLabel(id: number, labelId: number): Observable<ProvenanceLabel> {
    return this.http.post<ProvenanceLabel>(`/api/sets/${id}/labels/${labelId}/revoke`, {}, { context: formErrors() });
  }

  exportSets(format: 'json' | 'csv'): Observable<ExportFile> {
    return this.http
      .get('/api/export/sets', { params: new HttpParams().set('format', format), responseType: 'text', observe: 'response' })
      .pipe(map((res) => fileOf(res, `driftmark-sets.${format}`)));
  }
}

/** The list an answer holds: the answer itself when it is an array, else the first named field that is one. */
function listIn<T>(answer: unknown, ...fields: string[]): T[] {
  if (Array.isArray(answer)) return answer as T[];
  if (typeof answer === 'object' && answer !== null) {
    for (const f of fields) {
      const v = (answer as Record<string, unknown>)[f];
      if (Array.isArray(v)) return v as T[];
    }
  }
  return [];
}

/** The file a text download answers: its name from Content-Disposition, or the fallback. */
function fileOf(res: HttpResponse<string>, fallback: string): ExportFile {
  const header = res.headers.get('Content-Disposition');
  const m = header ? /filename="([^"]+)"/.exec(header) : null;
  return { filename: m ? m[1] : fallback, text: res.body ?? '' };
}

/** Saves text as a file through a temporary link (the browser's own download). */
export function downloadText(filename: string, text: string, type: string): void {
  const url = URL.createObjectURL(new Blob([text], { type }));
  const a = document.createElement('a');
  a.href = url;
  a.download = filename;
  document.body.appendChild(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 0);
}
