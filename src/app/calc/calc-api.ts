import { HttpClient, HttpParams } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import type { DecodedBands, Colour } from '@domain/colour-code';
import type { InCircuitResult } from '@domain/in-circuit';
import type { PreferredResult, SeriesName } from '@domain/preferred-values';
import type { NetworkRequest, VerdictRequest, VerdictResponse } from '@domain/quick-check';
import type { ReadingState } from '@domain/words';
import { Observable } from 'rxjs';
import { callerHandles } from '../core/errors/api-error';

/** `POST /api/calc/parse`: the text as the server understood it. */
export interface ParseAnswer {
  readonly state: ReadingState;
  readonly ohms: number | null;
  readonly tolerancePct: number | null;
  readonly display: string;
  readonly code: string;
  readonly warnings: readonly string[];
}

/** Colour-code requests: decode bands, decode body–tip–dot, or encode a value. */
export type ColourCodeRequest =
  | { bands: Colour[] }
  | { bodyTipDot: { body: Colour; tip: Colour | null; dot: Colour | null; end: Colour } }
  | { ohms: number; bandCount: 4 | 5; tolerancePct: number };

/**
 * The public calculation API (no sign-in). The quick check shows the server's errors itself
 * (beside the result, never in a snackbar), so every call tells the error interceptor so.
 */
@Injectable({ providedIn: 'root' })
export class CalcApi {
  private readonly http = inject(HttpClient);

  verdict(body: VerdictRequest): Observable<VerdictResponse> {
    return this.http.post<VerdictResponse>('/api/calc/verdict', body, { context: callerHandles() });
  }

  network(body: NetworkRequest): Observable<InCircuitResult> {
    return this.http.post<InCircuitResult>('/api/calc/network', body, { context: callerHandles() });
  }

  parse(text: string): Observable<ParseAnswer> {
    return this.http.post<ParseAnswer>('/api/calc/parse', { text }, { context: callerHandles() });
  }

  colourCode(body: ColourCodeRequest): Observable<DecodedBands | { bands: Colour[] }> {
    return this.http.post<DecodedBands | { bands: Colour[] }>('/api/calc/color-code', body, { context: callerHandles() });
  }

  preferred(ohms: number, series: SeriesName = 'E24'): Observable<PreferredResult> {
    const params = new HttpParams().set('ohms', ohms).set('series', series);
    return this.http.get<PreferredResult>('/api/calc/preferred', { params, context: callerHandles() });
  }
}
