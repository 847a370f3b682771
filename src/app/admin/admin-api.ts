import { HttpClient, HttpContext, HttpParams } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { Observable } from 'rxjs';
import { callerHandles } from '../core/errors/api-error';
import { Role } from '../core/auth/roles';

export interface AdminUser {
  readonly id: number | string;
  readonly email: string;
  readonly name: string;
  readonly roles: readonly Role[];
  readonly active: boolean;
  readonly createdAt: string;
}

export interface UserPage {
  readonly items: readonly AdminUser[];
  readonly total: number;
}

export interface UserQuery {
  readonly q: string;
  /** 1-based page number. */
  readonly page: number;
  readonly pageSize: number;
}

export interface InvitationSummary {
  readonly id: number | string;
  readonly email: string;
  readonly roles: readonly Role[];
  readonly expiresAt: string;
}

export interface AdminSettings {
  readonly openSignUp: boolean;
}

export interface UserChange {
  readonly name?: string;
  readonly roles?: readonly Role[];
  readonly active?: boolean;
}

/** The admin endpoints. Writes made from forms let the form show 400/409 beside the fields. */
@Injectable({ providedIn: 'root' })
export class AdminApi {
  private readonly http = inject(HttpClient);

  users(query: UserQuery): Observable<UserPage> {
    let params = new HttpParams().set('page', query.page).set('pageSize', query.pageSize);
    if (query.q) params = params.set('q', query.q);
    return this.http.get<UserPage>('/api/admin/users', { params });
  }

  createUser(body: { email: string; name: string; roles: readonly Role[]; password: string }): Observable<AdminUser> {
    return this.http.post<AdminUser>('/api/admin/users', body, { context: formErrors() });
  }

  /** PATCH a user; `fromForm` lets the form show 400/409 itself (the row buttons leave them to the snackbar). */
  updateUser(id: AdminUser['id'], change: UserChange, fromForm = false): Observable<AdminUser> {
    return this.http.patch<AdminUser>(`/api/admin/users/${encodeURIComponent(String(id))}`, change, {
      context: fromForm ? formErrors() : new HttpContext(),
    });
  }

  invite(body: { email: string; name?: string; roles: readonly Role[] }): Observable<InvitationSummary> {
    return this.http.post<InvitationSummary>('/api/admin/invitations', body, { context: formErrors() });
  }

  invitations(): Observable<{ items: readonly InvitationSummary[] }> {
    return this.http.get<{ items: readonly InvitationSummary[] }>('/api/admin/invitations');
  }

  settings(): Observable<AdminSettings> {
    return this.http.get<AdminSettings>('/api/admin/settings');
  }

  saveSettings(settings: AdminSettings): Observable<AdminSettings> {
    return this.http.put<AdminSettings>('/api/admin/settings', settings);
  }
}

function formErrors(): HttpContext {
  return callerHandles(400, 409, 422);
}
