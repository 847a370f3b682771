import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { Observable, map } from 'rxjs';
import { callerHandles } from '../core/errors/api-error';
import { Role, Session } from '../core/auth/roles';

export interface PublicSettings {
  readonly openSignUp: boolean;
}

export interface Invitation {
  readonly email: string;
  readonly name: string | null;
  readonly roles: readonly Role[];
}

/** The token-less account endpoints (sign-up, password reset, invitations). Forms show their errors. */
@Injectable({ providedIn: 'root' })
export class AccountApi {
  private readonly http = inject(HttpClient);

  publicSettings(): Observable<PublicSettings> {
    return this.http.get<PublicSettings>('/api/settings/public', { context: callerHandles() });
  }

  signUp(body: { email: string; name: string; password: string }): Observable<Session> {
    return this.http.post<Session>('/api/auth/sign-up', body, { context: callerHandles() });
  }

  requestPasswordReset(email: string): Observable<void> {
    return this.http
      .post('/api/auth/password-reset', { email }, { context: callerHandles() })
      .pipe(map(() => undefined));
  }

  confirmPasswordReset(token: string, password: string): Observable<void> {
    return this.http
      .post('/api/auth/password-reset/confirm', { token, password }, { context: callerHandles() })
      .pipe(map(() => undefined));
  }

  invitation(token: string): Observable<Invitation> {
    return this.http.get<Invitation>(`/api/auth/invitations/${encodeURIComponent(token)}`, {
      context: callerHandles(),
    });
  }

  acceptInvitation(body: { token: string; name: string; password: string }): Observable<Session> {
    return this.http.post<Session>('/api/auth/invitations/accept', body, { context: callerHandles() });
  }
}
