import { HttpClient, HttpParams } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import type { TemplateDocument, TubeTypeRecord } from '@domain/template-format';
import { Observable, map } from 'rxjs';
import { callerHandles } from '../../core/errors/api-error';
import type { DraftView } from './editor-store';

/** A tube type as the library lists it (GET /api/tube-types). */
export interface TubeTypeItem extends TubeTypeRecord {
  canEdit?: boolean;
}

/**
 * The editor's own data service: the draft (GET and PUT with its revision) and the tube-type
 * library. The editor shows save errors itself (400 problems at their fields, 409 with both
 * revisions), so the PUT tells the error interceptor so.
 */
@Injectable({ providedIn: 'root' })
export class DraftApi {
  private readonly http = inject(HttpClient);

  draft(templateId: number): Observable<DraftView> {
    return this.http.get<DraftView>(`/api/templates/${templateId}/draft`, { context: callerHandles(403, 404) });
  }

  saveDraft(templateId: number, revision: number, content: TemplateDocument): Observable<DraftView> {
    return this.http.put<DraftView>(`/api/templates/${templateId}/draft`, { revision, content }, { context: callerHandles(400, 409) });
  }

  /** The whole tube-type library (the API pages at most 500 a page). */
  tubeTypes(): Observable<TubeTypeItem[]> {
    const params = new HttpParams().set('pageSize', 500);
    return this.http.get<{ items: TubeTypeItem[] }>('/api/tube-types', { params }).pipe(map((r) => r.items));
  }
}
