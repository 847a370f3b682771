import { HttpClient, HttpParams } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { Observable, map } from 'rxjs';
import type { MeterProfile } from '@domain/meter';
import type { MeterCheckKind, MeterProfileRecord } from '@domain/set-format';
import { callerHandles } from '../core/errors/api-error';

/** POST /api/meter-profiles and PUT /api/meter-profiles/:id (PUT adds `version`). */
export interface MeterProfileInput {
  readonly name: string;
  readonly profile: MeterProfile;
  readonly checkKind: MeterCheckKind;
  readonly checkDate: string | null;
  readonly checkResistorOhms: number | null;
  readonly checkResistorTolerancePct: number | null;
}

const formErrors = () => callerHandles(400, 409);

/** The caller's own meter profiles (a meter is personal: nobody else sees them, admins neither). */
@Injectable({ providedIn: 'root' })
export class MetersApi {
  private readonly http = inject(HttpClient);

  /** The caller's profiles (`{ items }` from the API). */
  list(includeArchived = false): Observable<MeterProfileRecord[]> {
    const params = includeArchived ? new HttpParams().set('archived', 'true') : undefined;
    return this.http
      .get<{ items: MeterProfileRecord[] } | MeterProfileRecord[]>('/api/meter-profiles', { params })
      .pipe(map((answer) => (Array.isArray(answer) ? answer : (answer?.items ?? []))));
  }
  get(id: number): Observable<MeterProfileRecord> {
    return this.http.get<MeterProfileRecord>(`/api/meter-profiles/${id}`, { context: callerHandles(404) });
  }
  create(input: MeterProfileInput): Observable<MeterProfileRecord> {
    return this.http.post<MeterProfileRecord>('/api/meter-profiles', input, { context: formErrors() });
  }
  update(id: number, input: MeterProfileInput & { version: number }): Observable<MeterProfileRecord> {
    return this.http.put<MeterProfileRecord>(`/api/meter-profiles/${id}`, input, { context: formErrors() });
  }
  /** Archives the profile (a profile used by surveys is kept for them). */
  archive(id: number): Observable<unknown> {
    return this.http.delete(`/api/meter-profiles/${id}`, { context: formErrors() });
  }
}
