import { HttpClient, HttpEvent } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { Observable, map } from 'rxjs';
import { callerHandles } from '../core/errors/api-error';

// ---------------------------------------------------------------------------------------------
// The API's words (api/set-files/set-files.use-cases.ts `SetFileRecord`)

/** One photo of a set. */
export interface SetPhoto {
  readonly id: number;
  readonly setId: number;
  readonly caption: string;
  /** The reading it is attached to (one of the set's surveys), or null. */
  readonly readingId: number | null;
  /** The linked reading's test point and survey; null when not attached. */
  readonly testPointKey: string | null;
  readonly surveyId: number | null;
  /** The file name it was uploaded as. */
  readonly name: string;
  readonly mimeType: string;
  readonly bytes: number;
  readonly uploadedBy: { readonly id: number; readonly name: string } | null;
  readonly createdAt: string;
  readonly url: string;
  readonly thumbnailUrl: string | null;
}

export interface SetPhotoList {
  readonly setId: number;
  readonly items: readonly SetPhoto[];
}

/** What a set takes (api/set-files/set-files.use-cases.ts SET_PHOTO_TYPES); the server reads the type from the content anyway. */
export const SET_PHOTO_TYPES = 'image/jpeg,image/png,image/webp';
/** api/files/files.routes.ts CAPTION_MAX (the same caption rule as template files). */
export const PHOTO_CAPTION_MAX = 300;
/** The server's caption rule (one line, no tag): api/templates/template-schema.ts `line`. */
export const PHOTO_CAPTION_PATTERN = /^(?![\s\S]*<[A-Za-z/!?])[^\u0000-\u001f\u007f]*$/;

/** The photos of a set: list, upload (multipart), caption and reading link, delete, and the bytes as blobs. */
@Injectable({ providedIn: 'root' })
export class SetPhotosApi {
  private readonly http = inject(HttpClient);

  list(setId: number): Observable<readonly SetPhoto[]> {
    return this.http.get<SetPhotoList>(`/api/sets/${setId}/files`, { context: callerHandles() }).pipe(map((l) => l.items));
  }

  /** Multipart upload (`file`, `caption` when one is given, `readingId` when attached); the events carry the progress. */
  upload(setId: number, file: File, opts: { caption?: string; readingId?: number | null } = {}): Observable<HttpEvent<SetPhoto>> {
    const form = new FormData();
    if (opts.caption) form.append('caption', opts.caption);
    if (opts.readingId !== undefined && opts.readingId !== null) form.append('readingId', String(opts.readingId));
    form.append('file', file, file.name);
    return this.http.post<SetPhoto>(`/api/sets/${setId}/files`, form, { reportProgress: true, observe: 'events', context: callerHandles(400, 404, 413) });
  }

  /** A new caption ('' clears it) and/or the reading it is attached to (null detaches). */
  change(setId: number, photoId: number, change: { caption?: string; readingId?: number | null }): Observable<SetPhoto> {
    return this.http.patch<SetPhoto>(`/api/sets/${setId}/files/${photoId}`, change, { context: callerHandles(400, 404) });
  }

  remove(setId: number, photoId: number): Observable<void> {
    return this.http.delete<void>(`/api/sets/${setId}/files/${photoId}`, { context: callerHandles(404) });
  }

  /** The bytes of a photo or its thumbnail (the authToken interceptor adds the bearer token). */
  blob(url: string): Observable<Blob> {
    return this.http.get(url, { responseType: 'blob', context: callerHandles() });
  }
}
