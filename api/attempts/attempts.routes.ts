/** Routes of a student's class survey, its attempts, the reviews and the class results. */
import type { JSONSchemaType } from 'ajv';
import type { Ctx } from '../context';
import type { CommentInput, ReviewInput } from '../domain/class-format';
import type { RouteDef } from '../http/route-table';
import { ID, validate } from '../http/validate';
import { bigId, id, key, object, paragraph } from '../sets/set-schema';
import * as attemptsUc from './attempts.use-cases';
import * as resultsUc from './results.use-cases';
import * as reviewsUc from './reviews.use-cases';

const startBody = object({ meterProfileId: id }, []) as unknown as JSONSchemaType<{ meterProfileId?: number }>;
const commentBody = object({ testPointKey: key('tp'), readingId: { ...bigId, type: ['integer', 'null'] }, text: { ...paragraph(2000), minLength: 1 } }, ['testPointKey', 'text']) as unknown as JSONSchemaType<CommentInput>;
const reviewBody = object(
  {
    decision: { type: 'string', enum: ['accepted', 'returned'] },
    score: { type: ['number', 'null'], minimum: 0, maximum: 100 },
    comment: paragraph(4000),
    remeasureKeys: { type: 'array', maxItems: 500, uniqueItems: true, items: key('tp') },
  },
  ['decision', 'score'],
) as unknown as JSONSchemaType<ReviewInput>;

export function attemptRoutes(ctx: Ctx): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/api/assignments/:id',
      access: 'signed-in',
      summary: "An assignment: the instructor's view with the submission queue, or a student's own (status, survey, attempts)",
      validate: validate({ params: { id: ID } }),
      handler: async (req, res) => {
        res.json(await attemptsUc.getAssignment(ctx, req.signedIn!, Number(req.params.id)));
      },
    },
    {
      method: 'post',
      path: '/api/assignments/:id/survey',
      access: 'signed-in',
      summary: "Start the student's class survey of the assignment (201), or find the one started (200)",
      validate: validate({ body: startBody, params: { id: ID } }),
      handler: async (req, res) => {
        const out = await attemptsUc.startClassSurvey(ctx, req.signedIn!, Number(req.params.id), req.body as { meterProfileId?: number });
        res.status(out.status).json({ surveyId: out.surveyId });
      },
    },
    {
      method: 'post',
      path: '/api/surveys/:id/submit',
      access: 'signed-in',
      summary: 'Submit a class survey for review: its readings frozen as the next attempt; the instructor is notified',
      validate: validate({ params: { id: ID } }),
      handler: async (req, res) => {
        res.json(await attemptsUc.submitSurvey(ctx, req.signedIn!, Number(req.params.id)));
      },
    },
    {
      method: 'get',
      path: '/api/assignments/:id/attempts',
      access: 'signed-in',
      summary: "Every attempt of the assignment's students with its review, newest first (the instructor)",
      validate: validate({ params: { id: ID } }),
      handler: async (req, res) => {
        res.json(await attemptsUc.listAttempts(ctx, req.signedIn!, Number(req.params.id)));
      },
    },
    {
      method: 'get',
      path: '/api/attempts/:id/review',
      access: 'signed-in',
      summary: "An attempt side by side with the reference: values, E_n agreement, verdicts, prediction, hints, comments (the reference shows to the student once accepted)",
      validate: validate({ params: { id: ID } }),
      handler: async (req, res) => {
        res.json(await reviewsUc.reviewView(ctx, req.signedIn!, Number(req.params.id)));
      },
    },
    {
      method: 'post',
      path: '/api/attempts/:id/comments',
      access: 'signed-in',
      summary: 'Comment on a reading of the attempt under review (the instructor)',
      validate: validate({ body: commentBody, params: { id: ID } }),
      handler: async (req, res) => {
        res.status(201).json(await reviewsUc.addComment(ctx, req.signedIn!, Number(req.params.id), req.body as CommentInput));
      },
    },
    {
      method: 'delete',
      path: '/api/attempts/:id/comments/:commentId',
      access: 'signed-in',
      summary: 'Delete a comment before the review is decided (the instructor)',
      validate: validate({ params: { id: ID, commentId: ID } }),
      handler: async (req, res) => {
        await reviewsUc.deleteComment(ctx, req.signedIn!, Number(req.params.id), Number(req.params.commentId));
        res.status(204).end();
      },
    },
    {
      method: 'post',
      path: '/api/attempts/:id/review',
      access: 'signed-in',
      summary: 'Decide the review of the newest attempt: accept, or return with the test points to re-measure; a score (the instructor)',
      validate: validate({ body: reviewBody, params: { id: ID } }),
      handler: async (req, res) => {
        res.json(await reviewsUc.decide(ctx, req.signedIn!, Number(req.params.id), req.body as ReviewInput));
      },
    },
    {
      method: 'get',
      path: '/api/classes/:id/results',
      access: 'signed-in',
      summary: "A class's results: students × assignments (status, score) and per test point the share agreeing with the reference",
      validate: validate({ params: { id: ID } }),
      handler: async (req, res) => {
        res.json(await resultsUc.classResults(ctx, req.signedIn!, Number(req.params.id)));
      },
    },
    {
      method: 'get',
      path: '/api/classes/:id/results.csv',
      access: 'signed-in',
      summary: "A class's results as CSV: one row per student and assignment",
      validate: validate({ params: { id: ID } }),
      handler: async (req, res) => {
        const r = await resultsUc.classResults(ctx, req.signedIn!, Number(req.params.id));
        res.type('text/csv; charset=utf-8').set('Content-Disposition', `attachment; filename="class-${r.classId}-results.csv"`).send(resultsUc.resultsCsv(r));
      },
    },
  ];
}
