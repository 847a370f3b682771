import type { JSONSchemaType } from 'ajv';
import type { Ctx } from '../context';
import type { ReadingEdit, ReadingInput, SurveyStart } from '../domain/set-format';
import type { RouteDef } from '../http/route-table';
import { ID, validate } from '../http/validate';
import { bigId, clientKey, conditions, key, line, liftedEnd, method, object, paragraph, purpose, rangeIndex, readingText, rule, stateKey, version } from '../sets/set-schema';
import * as readingsUc from './readings.use-cases';
import { performance } from 'node:perf_hooks';
import { loadSurveyView, surveyViewJson } from './survey-view';
import * as surveysUc from './surveys.use-cases';

const startBody = object(
  { purpose, versionNumber: { type: 'integer', minimum: 1, maximum: 100000 }, meterProfileId: { type: ['integer', 'null'], minimum: 1, maximum: 2147483647 }, rule, conditions },
  ['purpose'],
) as unknown as JSONSchemaType<SurveyStart>;
const patchBody = object(
  { version, purpose, conditions, rule, meterProfileId: { type: ['integer', 'null'], minimum: 1, maximum: 2147483647 } },
  ['version'],
  { minProperties: 2 },
) as unknown as JSONSchemaType<surveysUc.SurveyPatch>;
const meterCheckBody = object({ text: readingText, rangeIndex }, ['text']) as unknown as JSONSchemaType<{ text: string; rangeIndex?: number | null }>;

const readingFields = {
  text: readingText,
  state: stateKey,
  method,
  liftedEnd,
  rangeIndex,
  note: paragraph(2000),
};
const readingBody = object(
  {
    testPointKey: key('tp'),
    clientKey,
    followsReadingId: { type: ['integer', 'null'], minimum: 1, maximum: 9007199254740991 },
    ...readingFields,
    prediction: { type: ['string', 'null'], maxLength: 40, pattern: '^(?![\\s\\S]*<[A-Za-z/!?])[^\\u0000-\\u001f\\u007f]*$' },
    takenAt: { type: 'string', format: 'date-time' },
  },
  ['testPointKey', 'clientKey'],
) as unknown as JSONSchemaType<ReadingInput>;
const editBody = object({ version, ...readingFields }, ['version'], { minProperties: 2 }) as unknown as JSONSchemaType<ReadingEdit>;
const amendmentBody = object(
  {
    readingId: bigId,
    reason: line(500, 1),
    change: object(
      {
        testPointKey: key('tp'),
        followsReadingId: { type: ['integer', 'null'], minimum: 1, maximum: 9007199254740991 },
        ...readingFields,
      },
      [],
      { minProperties: 1 },
    ),
  },
  ['reason', 'change'],
) as unknown as JSONSchemaType<{ readingId?: number; reason: string; change: readingsUc.AmendmentChange }>;
const jointBody = object({ testPointKey: key('tp'), checked: { type: 'boolean' } }) as unknown as JSONSchemaType<{ testPointKey: string; checked: boolean }>;
const liftBody = object(
  { componentKey: key('c'), end: { type: 'integer', enum: [0, 1] }, promptedByReadingId: { type: ['integer', 'null'], minimum: 1, maximum: 9007199254740991 }, note: paragraph(2000) },
  ['componentKey', 'end'],
) as unknown as JSONSchemaType<{ componentKey: string; end: 0 | 1; promptedByReadingId?: number | null; note?: string }>;
// A re-soldering says what was done ("joint remade"): the note is required.
const resolderBody = object({ recheckReadingId: { type: ['integer', 'null'], minimum: 1, maximum: 9007199254740991 }, note: { ...paragraph(2000), minLength: 1 } }, ['note']) as unknown as JSONSchemaType<{
  recheckReadingId?: number | null;
  note?: string;
}>;


/** A reading id in a path (bigint). */
const READING_ID = /^[1-9][0-9]{0,14}$/;

export function surveyRoutes(ctx: Ctx): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/api/sets/:id/surveys',
      access: 'signed-in',
      summary: "A set's surveys, newest first, with verdict counts",
      validate: validate({ params: { id: ID } }),
      handler: async (req, res) => {
        res.json(await surveysUc.listSurveys(ctx, req.signedIn!, Number(req.params.id)));
      },
    },
    {
      method: 'post',
      path: '/api/sets/:id/surveys',
      access: 'signed-in',
      summary: "Start a survey (carries over the newest survey's conditions and order, never its values)",
      validate: validate({ body: startBody, params: { id: ID } }),
      handler: async (req, res) => {
        res.status(201).json(await surveysUc.startSurvey(ctx, req.signedIn!, Number(req.params.id), req.body as SurveyStart));
      },
    },
    {
      method: 'get',
      path: '/api/surveys/:id',
      access: 'signed-in',
      summary: 'A survey with its template version, readings and verdicts (everything the grid needs)',
      validate: validate({ params: { id: ID } }),
      handler: async (req, res) => {
        const body = surveyViewJson(await loadSurveyView(ctx, req.signedIn!, Number(req.params.id)));
        // The server's own time for the answer, body made (W3C Server Timing): the bench reads it.
        const started = res.locals['startedAt'] as number | undefined;
        if (started !== undefined) res.setHeader('Server-Timing', `app;dur=${(performance.now() - started).toFixed(2)}`);
        res.type('application/json').send(body);
      },
    },
    {
      method: 'patch',
      path: '/api/surveys/:id',
      access: 'signed-in',
      summary: 'Change conditions, rule, meter or purpose of a draft survey (with its version)',
      validate: validate({ body: patchBody, params: { id: ID } }),
      handler: async (req, res) => {
        res.json(await surveysUc.patchSurvey(ctx, req.signedIn!, Number(req.params.id), req.body as surveysUc.SurveyPatch));
      },
    },
    {
      method: 'post',
      path: '/api/surveys/:id/meter-check',
      access: 'signed-in',
      summary: "The meter's check resistor read at the start of the survey",
      validate: validate({ body: meterCheckBody, params: { id: ID } }),
      handler: async (req, res) => {
        res.json(await surveysUc.meterCheck(ctx, req.signedIn!, Number(req.params.id), req.body as { text: string; rangeIndex?: number | null }));
      },
    },
    {
      method: 'post',
      path: '/api/surveys/:id/readings',
      access: 'signed-in',
      auth: 'folded',
      summary: 'Save a reading (idempotent by client key: a replay answers 200 with the stored reading)',
      validate: validate({ body: readingBody, params: { id: ID } }),
      handler: async (req, res) => {
        const out = await readingsUc.saveReading(ctx, req.claims!, Number(req.params.id), req.body as ReadingInput);
        res.status(out.status).json(out.body);
      },
    },
    {
      method: 'patch',
      path: '/api/surveys/:id/readings/:readingId',
      access: 'signed-in',
      summary: "Change a draft survey's reading (with its version; a stale one is a 409 with both values)",
      validate: validate({ body: editBody, params: { id: ID, readingId: READING_ID } }),
      handler: async (req, res) => {
        res.json(await readingsUc.editReading(ctx, req.signedIn!, Number(req.params.id), Number(req.params.readingId), req.body as ReadingEdit));
      },
    },
    {
      method: 'post',
      path: '/api/surveys/:id/complete',
      access: 'signed-in',
      summary: 'Complete a draft survey (read-only afterwards: amendments only)',
      validate: validate({ params: { id: ID } }),
      handler: async (req, res) => {
        res.json(await surveysUc.completeSurvey(ctx, req.signedIn!, Number(req.params.id)));
      },
    },
    {
      method: 'post',
      path: '/api/surveys/:id/amendments',
      access: 'signed-in',
      summary: 'Amend a complete survey: who, when, why, and the change (an edited or a new reading)',
      validate: validate({ body: amendmentBody, params: { id: ID } }),
      handler: async (req, res) => {
        res.status(201).json(await readingsUc.amend(ctx, req.signedIn!, Number(req.params.id), req.body as { readingId?: number; reason: string; change: readingsUc.AmendmentChange }));
      },
    },
    {
      method: 'post',
      path: '/api/surveys/:id/joint-checks',
      access: 'signed-in',
      summary: "Mark a test point's path (joints and contacts) checked, or not",
      validate: validate({ body: jointBody, params: { id: ID } }),
      handler: async (req, res) => {
        res.json(await surveysUc.jointCheck(ctx, req.signedIn!, Number(req.params.id), req.body as { testPointKey: string; checked: boolean }));
      },
    },
    {
      method: 'post',
      path: '/api/surveys/:id/lifted-leads',
      access: 'signed-in',
      summary: 'Lift a lead: the entry stays on the lifted-lead list until re-soldered',
      validate: validate({ body: liftBody, params: { id: ID } }),
      handler: async (req, res) => {
        res.status(201).json(await surveysUc.liftLead(ctx, req.signedIn!, Number(req.params.id), req.body as { componentKey: string; end: 0 | 1; promptedByReadingId?: number | null; note?: string }));
      },
    },
    {
      method: 'get',
      path: '/api/sets/:id/lifted-leads',
      access: 'signed-in',
      summary: "A set's lifted-lead list (open ones first)",
      validate: validate({ params: { id: ID } }),
      handler: async (req, res) => {
        res.json(await surveysUc.listLiftedLeads(ctx, req.signedIn!, Number(req.params.id)));
      },
    },
    {
      method: 'post',
      path: '/api/sets/:id/lifted-leads/:leadId/resolder',
      access: 'signed-in',
      summary: 'Mark a lifted lead re-soldered (optionally with a re-check reading); 409 when it is already',
      validate: validate({ body: resolderBody, params: { id: ID, leadId: ID } }),
      handler: async (req, res) => {
        res.json(await surveysUc.resolder(ctx, req.signedIn!, Number(req.params.id), Number(req.params.leadId), req.body as { recheckReadingId?: number | null; note?: string }));
      },
    },
  ];
}
