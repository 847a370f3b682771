import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { Observable } from 'rxjs';
import type { NotificationList } from '@domain/class-format';
import { callerHandles } from '../core/errors/api-error';

/** The signed-in user's in-app notifications (class invitations, submissions, reviews, due dates). */
@Injectable({ providedIn: 'root' })
export class NotificationsApi {
  private readonly http = inject(HttpClient);

  /** Newest first, at most 100, with the unread count. Failures stay quiet (the bell just shows nothing new). */
  list(): Observable<NotificationList> {
    return this.http.get<NotificationList>('/api/notifications', { context: callerHandles() });
  }
  markRead(id: number): Observable<unknown> {
    return this.http.post(`/api/notifications/${id}/read`, {}, { context: callerHandles() });
  }
  markAllRead(): Observable<unknown> {
    return this.http.post('/api/notifications/read-all', {}, { context: callerHandles() });
  }
}
