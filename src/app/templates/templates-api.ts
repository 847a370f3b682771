import { HttpClient, HttpErrorResponse, HttpParams, HttpResponse } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { Observable, map } from 'rxjs';
import type { BaseName, ChassisKind, Component, Heating, PowerArrangement, TemplateDocument, TemplateProblem, TestPoint, TubePin } from '@domain/template-format';
import type { TemplateVersionState } from '@domain/words';
import { callerHandles } from '../core/errors/api-error';

// ---------------------------------------------------------------------------------------------
// Words of the API (schema/templates.ts holds the server's lists; the app cannot import Drizzle)

export const TEMPLATE_VISIBILITIES = ['private', 'shared', 'public'] as const;
export type TemplateVisibility = (typeof TEMPLATE_VISIBILITIES)[number];
export type CorrectionState = 'open' | 'accepted' | 'declined';
export type CorrectionTargetKind = 'component' | 'test-point';
export type LibrarySort = 'use' | 'maker' | 'model' | 'updated';
/** A version by number, or the owner's draft. */
export type VersionRef = number | 'draft';

// ---------------------------------------------------------------------------------------------
// Answers

export interface PersonRef {
  readonly id: number;
  readonly name: string;
}

/** A library row (and the head of a template's page). */
export interface TemplateSummary {
  readonly id: number;
  readonly maker: string;
  readonly model: string;
  readonly chassisNumber: string;
  readonly kind: ChassisKind;
  readonly power: PowerArrangement;
  readonly yearFrom: number | null;
  readonly yearTo: number | null;
  readonly owner: PersonRef;
  readonly authorName: string;
  readonly own: boolean;
  readonly visibility: TemplateVisibility;
  readonly latestVersion: number | null;
  readonly versionCount: number;
  readonly stageCount: number;
  readonly testPointCount: number;
  readonly componentCount: number;
  readonly surveyCount: number;
  readonly tubeTypes: readonly string[];
  readonly copiedFrom: { readonly templateId: number | null; readonly versionNumber: number | null; readonly authorName: string } | null;
  readonly updatedAt: string;
}

export interface LibraryPage {
  readonly items: readonly TemplateSummary[];
  readonly total: number;
  readonly page: number;
  readonly pageSize: number;
}

export interface LibraryQuery {
  readonly q?: string;
  readonly maker?: string;
  readonly model?: string;
  readonly chassis?: string;
  readonly tubeType?: string;
  readonly kind?: ChassisKind | '';
  readonly author?: string;
  readonly sort: LibrarySort;
  /** 1-based. */
  readonly page: number;
  readonly pageSize: number;
}

export interface VersionSummary {
  readonly number: number;
  readonly state: Exclude<TemplateVersionState, 'draft'>;
  readonly changelog: string | null;
  readonly publishedAt: string | null;
  readonly publishedBy: PersonRef | null;
  readonly retiredAt: string | null;
  readonly retiredReason: string | null;
  readonly stageCount: number;
  readonly testPointCount: number;
  readonly componentCount: number;
}

/** `GET /api/templates/:id`: owner and admin also get the revision, the draft and the shares. */
export interface TemplateView extends TemplateSummary {
  readonly createdAt: string;
  readonly canEdit: boolean;
  readonly revision?: number;
  readonly draft?: { readonly revision: number; readonly updatedAt: string } | null;
  readonly sharedWith?: readonly PersonRef[];
  readonly versions: readonly VersionSummary[];
}

/** A published or retired version with its content. */
export interface VersionView extends VersionSummary {
  readonly templateId: number;
  readonly content: TemplateDocument;
}

/** The draft (or the content a new draft starts from). */
export interface DraftView {
  readonly templateId: number;
  readonly exists: boolean;
  readonly revision: number;
  readonly basedOn: number | null;
  readonly content: TemplateDocument;
}

export interface DiffEntry<T> {
  readonly key: string;
  readonly label: string;
  readonly before?: T;
  readonly after?: T;
  readonly fields?: readonly string[];
}

export interface DiffSection<T> {
  readonly added: readonly DiffEntry<T>[];
  readonly removed: readonly DiffEntry<T>[];
  readonly changed: readonly DiffEntry<T>[];
}

export interface TemplateDiff {
  readonly templateId: number;
  readonly from: VersionRef;
  readonly to: VersionRef;
  readonly components: DiffSection<Component>;
  readonly testPoints: DiffSection<TestPoint>;
  readonly chassis: readonly string[];
  readonly stages: { readonly added: readonly string[]; readonly removed: readonly string[]; readonly changed: readonly string[] };
}

export interface Correction {
  readonly id: number;
  /** The target as a person names it in the correction's own version ("component R12", "test point 7"). */
  readonly targetLabel: string;
  readonly templateId: number;
  readonly versionNumber: number;
  readonly target: { readonly kind: CorrectionTargetKind; readonly key: string };
  readonly change: Readonly<Record<string, unknown>>;
  readonly note: string;
  readonly author: PersonRef | null;
  readonly state: CorrectionState;
  readonly decisionNote: string | null;
  readonly decidedAt: string | null;
  readonly createdAt: string;
}

export interface CorrectionInput {
  readonly versionNumber: number;
  readonly target: { readonly kind: CorrectionTargetKind; readonly key: string };
  readonly change: Readonly<Record<string, unknown>>;
  readonly note: string;
}

export interface DecisionAnswer {
  readonly correction: Correction;
  /** Accepted: the draft's new revision. */
  readonly draft: { readonly revision: number } | null;
}

export interface SharingAnswer {
  readonly templateId: number;
  readonly visibility: TemplateVisibility;
  readonly sharedWith: readonly PersonRef[];
}

export interface NewChassis {
  readonly maker: string;
  readonly model: string;
  readonly chassisNumber?: string;
  readonly yearFrom?: number;
  readonly yearTo?: number;
  readonly kind: ChassisKind;
  readonly power: PowerArrangement;
}

/** The canonical export: the file name the server proposes and the JSON text. */
export interface ExportFile {
  readonly filename: string;
  readonly text: string;
}

export interface TubeType {
  readonly designation: string;
  readonly base: BaseName;
  readonly heating: Heating;
  readonly heaterVolts: number;
  readonly heaterAmps: number;
  readonly pins: readonly TubePin[];
  readonly ties: readonly (readonly [number, number])[];
  readonly notes: string;
  readonly createdBy: PersonRef | null;
  readonly canEdit: boolean;
  readonly createdAt: string;
  readonly updatedAt: string;
}

export interface TubeTypePage {
  readonly items: readonly TubeType[];
  readonly total: number;
  readonly page: number;
  readonly pageSize: number;
}

export interface TubeTypeInput {
  readonly base: BaseName;
  readonly heating: Heating;
  readonly heaterVolts: number;
  readonly heaterAmps: number;
  readonly pins: readonly TubePin[];
  readonly ties: readonly (readonly [number, number])[];
  readonly notes: string;
}

// ---------------------------------------------------------------------------------------------
// Errors

/** Every problem of a 400 answer (`details.problems`), or none. */
export function problemsOf(err: unknown): TemplateProblem[] {
  if (!(err instanceof HttpErrorResponse)) return [];
  const details = (err.error as { error?: { details?: { problems?: unknown } } } | null)?.error?.details;
  const problems = details?.problems;
  if (!Array.isArray(problems)) return [];
  return problems.filter((p): p is TemplateProblem => typeof p?.path === 'string' && typeof p?.message === 'string');
}

/** Form calls show their own 400 and 409 answers beside the fields or in an alert. */
const formErrors = () => callerHandles(400, 409);

const enc = (s: string | number) => encodeURIComponent(String(s));

/** Every call of the templates and tube-types API, typed. */
@Injectable({ providedIn: 'root' })
export class TemplatesApi {
  private readonly http = inject(HttpClient);

  library(query: LibraryQuery): Observable<LibraryPage> {
    let params = new HttpParams().set('sort', query.sort).set('page', query.page).set('pageSize', query.pageSize);
    for (const key of ['q', 'maker', 'model', 'chassis', 'tubeType', 'kind', 'author'] as const) {
      const value = query[key]?.trim();
      if (value) params = params.set(key, value);
    }
    return this.http.get<LibraryPage>('/api/templates', { params });
  }

  create(chassis: NewChassis): Observable<TemplateView> {
    return this.http.post<TemplateView>('/api/templates', { chassis }, { context: formErrors() });
  }

  /** All or nothing: a 400 carries every problem with its JSON path. */
  importDocument(document: unknown): Observable<TemplateView> {
    return this.http.post<TemplateView>('/api/templates/import', { document }, { context: formErrors() });
  }

  template(id: number): Observable<TemplateView> {
    return this.http.get<TemplateView>(`/api/templates/${enc(id)}`, { context: callerHandles(404) });
  }

  version(id: number, number: number): Observable<VersionView> {
    return this.http.get<VersionView>(`/api/templates/${enc(id)}/versions/${enc(number)}`);
  }

  draft(id: number): Observable<DraftView> {
    return this.http.get<DraftView>(`/api/templates/${enc(id)}/draft`);
  }

  publish(id: number, changelog: string): Observable<TemplateView> {
    return this.http.post<TemplateView>(`/api/templates/${enc(id)}/publish`, { changelog }, { context: formErrors() });
  }

  retire(id: number, number: number, reason: string): Observable<TemplateView> {
    return this.http.post<TemplateView>(`/api/templates/${enc(id)}/versions/${enc(number)}/retire`, { reason }, { context: formErrors() });
  }

  diff(id: number, from: VersionRef, to: VersionRef): Observable<TemplateDiff> {
    const params = new HttpParams().set('from', from).set('to', to);
    return this.http.get<TemplateDiff>(`/api/templates/${enc(id)}/diff`, { params, context: callerHandles(400, 404) });
  }

  /** The canonical JSON of a version (or the draft; none: the latest published). */
  exportVersion(id: number, version?: VersionRef): Observable<ExportFile> {
    const params = version === undefined ? new HttpParams() : new HttpParams().set('version', version);
    return this.http
      .get(`/api/templates/${enc(id)}/export`, { params, responseType: 'text', observe: 'response' })
      .pipe(map((r: HttpResponse<string>) => ({ filename: filenameOf(r.headers.get('Content-Disposition')) ?? `template-${id}.driftmark.json`, text: r.body ?? '' })));
  }

  copy(id: number, version: VersionRef): Observable<TemplateView> {
    return this.http.post<TemplateView>(`/api/templates/${enc(id)}/copy`, { version });
  }

  share(id: number, visibility: TemplateVisibility, userIds: readonly number[]): Observable<SharingAnswer> {
    return this.http.put<SharingAnswer>(`/api/templates/${enc(id)}/sharing`, { visibility, userIds }, { context: formErrors() });
  }

  corrections(id: number): Observable<{ items: readonly Correction[] }> {
    return this.http.get<{ items: readonly Correction[] }>(`/api/templates/${enc(id)}/corrections`);
  }

  proposeCorrection(id: number, input: CorrectionInput): Observable<Correction> {
    return this.http.post<Correction>(`/api/templates/${enc(id)}/corrections`, input, { context: formErrors() });
  }

  decideCorrection(id: number, correctionId: number, decision: 'accept' | 'decline', note: string): Observable<DecisionAnswer> {
    const body = note.trim() ? { decision, note: note.trim() } : { decision };
    return this.http.post<DecisionAnswer>(`/api/templates/${enc(id)}/corrections/${enc(correctionId)}/decision`, body, { context: formErrors() });
  }

  tubeTypes(query: { q?: string; page: number; pageSize: number }): Observable<TubeTypePage> {
    let params = new HttpParams().set('page', query.page).set('pageSize', query.pageSize);
    if (query.q?.trim()) params = params.set('q', query.q.trim());
    return this.http.get<TubeTypePage>('/api/tube-types', { params });
  }

  tubeType(designation: string): Observable<TubeType> {
    return this.http.get<TubeType>(`/api/tube-types/${enc(designation)}`, { context: callerHandles(404) });
  }

  createTubeType(designation: string, input: TubeTypeInput): Observable<TubeType> {
    return this.http.post<TubeType>('/api/tube-types', { designation, ...input }, { context: formErrors() });
  }

  updateTubeType(designation: string, input: TubeTypeInput): Observable<TubeType> {
    return this.http.put<TubeType>(`/api/tube-types/${enc(designation)}`, input, { context: formErrors() });
  }
}

/** The file name of a `Content-Disposition: attachment; filename="…"` header. */
export function filenameOf(header: string | null): string | null {
  const m = header ? /filename="([^"]+)"/.exec(header) : null;
  return m ? m[1] : null;
}

/** Saves text as a file through a temporary link (the browser's own download). */
export function downloadText(filename: string, text: string, type = 'application/json'): void {
  const url = URL.createObjectURL(new Blob([text], { type }));
  const a = document.createElement('a');
  a.href = url;
  a.download = filename;
  document.body.appendChild(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 0);
}
