import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { Observable } from 'rxjs';
import { callerHandles } from '../core/errors/api-error';
import type { PublicRecord } from '../sets/sets-api';

/** The public provenance record: no sign-in, no owner identity; a revoked or unknown token is a 404. */
@Injectable({ providedIn: 'root' })
export class ProvenanceApi {
  private readonly http = inject(HttpClient);

  publicRecord(token: string): Observable<PublicRecord> {
    return this.http.get<PublicRecord>(`/api/public/labels/${encodeURIComponent(token)}`, { context: callerHandles(404) });
  }
}
