import { HttpClient, HttpResponse } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { Observable, map } from 'rxjs';
import type {
  AssignmentDetail,
  AssignmentInput,
  AssignmentPatch,
  AttemptSummary,
  ClassDetail,
  ClassInput,
  ClassInvitation,
  ClassPatch,
  ClassResults,
  ClassSummary,
  CommentInput,
  CompetencyKey,
  CompetencyRecord,
  CompetencySignoff,
  InvitationAccept,
  InvitationPreview,
  ReadingComment,
  ReviewInput,
  ReviewRecord,
  ReviewView,
} from '@domain/class-format';
import type { Session } from '../core/auth/roles';
import { callerHandles } from '../core/errors/api-error';

/** A text download: the file name the server proposes and the text. */
export interface ClassFile {
  readonly filename: string;
  readonly text: string;
}

/** The caller shows these statuses itself (forms and refusals). */
const formErrors = () => callerHandles(400, 403, 409);
const enc = (s: string | number) => encodeURIComponent(String(s));

/** Every call the class screens make: classes, invitations, assignments, attempts, reviews, competencies. */
@Injectable({ providedIn: 'root' })
export class ClassesApi {
  private readonly http = inject(HttpClient);

  // Classes -------------------------------------------------------------------------------------
  list(): Observable<ClassSummary[]> {
    return this.http.get<{ items: ClassSummary[] }>('/api/classes').pipe(map((a) => a.items ?? []));
  }
  create(input: ClassInput): Observable<ClassDetail> {
    return this.http.post<ClassDetail>('/api/classes', input, { context: formErrors() });
  }
  get(id: number): Observable<ClassDetail> {
    return this.http.get<ClassDetail>(`/api/classes/${id}`, { context: callerHandles(404) });
  }
  update(id: number, patch: ClassPatch): Observable<ClassDetail> {
    return this.http.patch<ClassDetail>(`/api/classes/${id}`, patch, { context: formErrors() });
  }
  invite(id: number, emails: string[]): Observable<ClassInvitation[]> {
    return this.http
      .post<{ items: ClassInvitation[] }>(`/api/classes/${id}/invitations`, { emails }, { context: formErrors() })
      .pipe(map((a) => a.items ?? []));
  }
  revokeInvitation(id: number, invitationId: number): Observable<unknown> {
    return this.http.delete(`/api/classes/${id}/invitations/${invitationId}`, { context: formErrors() });
  }
  removeStudent(id: number, studentId: number): Observable<unknown> {
    return this.http.delete(`/api/classes/${id}/students/${studentId}`, { context: formErrors() });
  }
  results(id: number): Observable<ClassResults> {
    return this.http.get<ClassResults>(`/api/classes/${id}/results`);
  }
  resultsCsv(id: number): Observable<ClassFile> {
    return this.http
      .get(`/api/classes/${id}/results.csv`, { responseType: 'text', observe: 'response' })
      .pipe(map((res) => fileOf(res, `class-${id}-results.csv`)));
  }

  // Invitations (the link in the mail) -----------------------------------------------------------
  invitation(token: string): Observable<InvitationPreview> {
    return this.http.get<InvitationPreview>(`/api/class-invitations/${enc(token)}`, { context: callerHandles(404) });
  }
  /** Creates the account (role student) and joins; answers like sign-in. */
  acceptInvitation(token: string, input: InvitationAccept): Observable<Session> {
    return this.http.post<Session>(`/api/class-invitations/${enc(token)}/accept`, input, { context: callerHandles(400, 404, 409) });
  }
  /** The signed-in account joins (its e-mail must be the invitation's). */
  joinWithInvitation(token: string): Observable<unknown> {
    return this.http.post(`/api/class-invitations/${enc(token)}/join`, {}, { context: callerHandles(400, 403, 404, 409) });
  }

  // Assignments ---------------------------------------------------------------------------------
  createAssignment(classId: number, input: AssignmentInput): Observable<AssignmentDetail> {
    return this.http.post<AssignmentDetail>(`/api/classes/${classId}/assignments`, input, { context: formErrors() });
  }
  assignment(id: number): Observable<AssignmentDetail> {
    return this.http.get<AssignmentDetail>(`/api/assignments/${id}`, { context: callerHandles(404) });
  }
  updateAssignment(id: number, patch: AssignmentPatch): Observable<AssignmentDetail> {
    return this.http.patch<AssignmentDetail>(`/api/assignments/${id}`, patch, { context: formErrors() });
  }
  /** The student's class survey: made on the first call, the same one afterwards. */
  startAssignmentSurvey(id: number, meterProfileId: number | null = null): Observable<{ surveyId: number }> {
    const body = meterProfileId === null ? {} : { meterProfileId };
    return this.http.post<{ surveyId: number }>(`/api/assignments/${id}/survey`, body, { context: formErrors() });
  }
  attempts(assignmentId: number): Observable<AttemptSummary[]> {
    return this.http.get<AttemptSummary[] | { items: AttemptSummary[] }>(`/api/assignments/${assignmentId}/attempts`).pipe(map((a) => (Array.isArray(a) ? a : (a.items ?? []))));
  }

  // Reviews -------------------------------------------------------------------------------------
  review(attemptId: number): Observable<ReviewView> {
    return this.http.get<ReviewView>(`/api/attempts/${attemptId}/review`, { context: callerHandles(404) });
  }
  addComment(attemptId: number, input: CommentInput): Observable<ReadingComment> {
    return this.http.post<ReadingComment>(`/api/attempts/${attemptId}/comments`, input, { context: formErrors() });
  }
  deleteComment(attemptId: number, commentId: number): Observable<unknown> {
    return this.http.delete(`/api/attempts/${attemptId}/comments/${commentId}`, { context: formErrors() });
  }
  decide(attemptId: number, input: ReviewInput): Observable<ReviewRecord> {
    return this.http.post<ReviewRecord>(`/api/attempts/${attemptId}/review`, input, { context: formErrors() });
  }

  // Competencies --------------------------------------------------------------------------------
  competencies(studentId: number | string): Observable<CompetencyRecord> {
    return this.http.get<CompetencyRecord>(`/api/students/${enc(studentId)}/competencies`, { context: callerHandles(404) });
  }
  signOff(studentId: number, input: { competencyKey: CompetencyKey; classId?: number; note?: string }): Observable<CompetencySignoff> {
    return this.http.post<CompetencySignoff>(`/api/students/${studentId}/competencies`, input, { context: formErrors() });
  }
  withdraw(signoffId: number, note: string): Observable<CompetencySignoff> {
    return this.http.post<CompetencySignoff>(`/api/competency-signoffs/${signoffId}/withdraw`, { note }, { context: formErrors() });
  }
}

/** The file a text download answers: its name from Content-Disposition, or the fallback. */
function fileOf(res: HttpResponse<string>, fallback: string): ClassFile {
  const header = res.headers.get('Content-Disposition');
  const m = header ? /filename="([^"]+)"/.exec(header) : null;
  return { filename: m ? m[1] : fallback, text: res.body ?? '' };
}
