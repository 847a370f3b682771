/**
 * Routes of what a set records after the survey: gates and first power, bring-up log, parts
 * record, replacement list and marks, history and comparison, the printable record, provenance
 * labels (and their public page), and the export of a user's sets.
 */
import type { Ctx } from '../context';
import type { RouteDef } from '../http/route-table';
import { ID, validate, validQuery } from '../http/validate';
import { COMPONENT_KEY_PARAM, ITEM_KEY_PARAM, TOKEN_PARAM, bringUpBody, compareQuery, emptyQuery, formatQuery, marksBody, noteBody, partsLineBody, reasonBody, replacementsQuery, type CompareQuery, type ReplacementsQuery } from './records.schema';
import * as records from './records.use-cases';
import * as reports from './reports.use-cases';

const setId = (req: { params: Record<string, unknown> }) => Number(req.params.id);
const idParams = { id: ID };

export function recordRoutes(ctx: Ctx): RouteDef[] {
  return [
    // Gates
    {
      method: 'get',
      path: '/api/sets/:id/gates',
      access: 'signed-in',
      summary: 'The set\u2019s safety gates (items from its kind, newest signature each), open lifted leads and first power',
      validate: validate({ params: idParams, query: emptyQuery }),
      handler: async (req, res) => {
        res.json(await records.getGates(ctx, req.signedIn!, setId(req)));
      },
    },
    {
      method: 'post',
      path: '/api/sets/:id/gates/:itemKey/sign',
      access: 'signed-in',
      summary: 'Sign a gate item (an append-only record of who and when)',
      validate: validate({ params: { ...idParams, itemKey: ITEM_KEY_PARAM }, body: noteBody }),
      handler: async (req, res) => {
        res.status(201).json(await records.markGate(ctx, req.signedIn!, setId(req), String(req.params.itemKey), 'signed', (req.body as { note: string }).note));
      },
    },
    {
      method: 'post',
      path: '/api/sets/:id/gates/:itemKey/reopen',
      access: 'signed-in',
      summary: 'Re-open a signed gate item, saying why',
      validate: validate({ params: { ...idParams, itemKey: ITEM_KEY_PARAM }, body: reasonBody }),
      handler: async (req, res) => {
        res.status(201).json(await records.markGate(ctx, req.signedIn!, setId(req), String(req.params.itemKey), 'reopened', (req.body as { note: string }).note));
      },
    },
    {
      method: 'post',
      path: '/api/sets/:id/first-power',
      access: 'signed-in',
      summary: 'Record "ready for first power" (409, nothing written, while a gate item or a lifted lead is open)',
      validate: validate({ params: idParams, body: noteBody }),
      handler: async (req, res) => {
        res.status(201).json(await records.recordFirstPower(ctx, req.signedIn!, setId(req), (req.body as { note: string }).note));
      },
    },
    // Bring-up log
    {
      method: 'get',
      path: '/api/sets/:id/bring-up',
      access: 'signed-in',
      summary: 'The bring-up log (limiter lamp or variac steps after first power)',
      validate: validate({ params: idParams, query: emptyQuery }),
      handler: async (req, res) => {
        res.json(await records.getBringUp(ctx, req.signedIn!, setId(req)));
      },
    },
    {
      method: 'post',
      path: '/api/sets/:id/bring-up',
      access: 'signed-in',
      summary: 'Add a bring-up step (409 before first power is recorded)',
      validate: validate({ params: idParams, body: bringUpBody }),
      handler: async (req, res) => {
        res.status(201).json(await records.addBringUp(ctx, req.signedIn!, setId(req), req.body as records.BringUpInput));
      },
    },
    // Parts record
    {
      method: 'get',
      path: '/api/sets/:id/parts-record',
      access: 'signed-in',
      summary: 'The parts record: every line, and the newest per component',
      validate: validate({ params: idParams, query: emptyQuery }),
      handler: async (req, res) => {
        res.json(await records.getPartsRecord(ctx, req.signedIn!, setId(req)));
      },
    },
    {
      method: 'post',
      path: '/api/sets/:id/parts-record',
      access: 'signed-in',
      summary: 'Add a parts-record line (kept, replaced with the new part, left); capacitor checks come back as warnings',
      validate: validate({ params: idParams, body: partsLineBody }),
      handler: async (req, res) => {
        res.status(201).json(await records.addPartsLine(ctx, req.signedIn!, setId(req), req.body as records.PartsLineInput));
      },
    },
    // Replacement list
    {
      method: 'get',
      path: '/api/sets/:id/replacements',
      access: 'signed-in',
      summary: 'The replacement list of a survey (default the newest): order, to confirm, capacitors; ?format=csv',
      validate: validate({ params: idParams, query: replacementsQuery }),
      handler: async (req, res) => {
        const q = validQuery<ReplacementsQuery>(req);
        const view = await reports.getReplacements(ctx, req.signedIn!, setId(req), q);
        if (q.format === 'csv') {
          res
            .type('text/csv; charset=utf-8')
            .set('Content-Disposition', `attachment; filename="set-${view.setId}-replacements.csv"`)
            .send(reports.replacementCsv(view));
        } else res.json(view);
      },
    },
    {
      method: 'put',
      path: '/api/sets/:id/replacements/:componentKey/marks',
      access: 'signed-in',
      summary: 'Mark a replacement line ordered / received',
      validate: validate({ params: { ...idParams, componentKey: COMPONENT_KEY_PARAM }, body: marksBody }),
      handler: async (req, res) => {
        res.json(await records.setMarks(ctx, req.signedIn!, setId(req), String(req.params.componentKey), req.body as { ordered: boolean; received: boolean }));
      },
    },
    // History
    {
      method: 'get',
      path: '/api/sets/:id/history',
      access: 'signed-in',
      summary: 'Each part instance across the set\u2019s complete surveys, with a drift rate where the data allow one',
      validate: validate({ params: idParams, query: emptyQuery }),
      handler: async (req, res) => {
        res.json(await reports.getHistory(ctx, req.signedIn!, setId(req)));
      },
    },
    {
      method: 'get',
      path: '/api/sets/:id/compare',
      access: 'signed-in',
      summary: 'Two surveys of the set side by side: values, verdicts, change in percent',
      validate: validate({ params: idParams, query: compareQuery }),
      handler: async (req, res) => {
        const q = validQuery<CompareQuery>(req);
        res.json(await reports.compareSurveys(ctx, req.signedIn!, setId(req), q.a, q.b));
      },
    },
    // Record
    {
      method: 'get',
      path: '/api/sets/:id/record',
      access: 'signed-in',
      summary: 'Everything for the printable record of a set',
      validate: validate({ params: idParams, query: emptyQuery }),
      handler: async (req, res) => {
        res.json(await reports.getRecord(ctx, req.signedIn!, setId(req)));
      },
    },
    // Provenance labels
    {
      method: 'post',
      path: '/api/sets/:id/labels',
      access: 'signed-in',
      summary: 'A new provenance label: an unguessable, revocable link (409 while PUBLIC_BASE_URL is unset)',
      validate: validate({ params: idParams }),
      handler: async (req, res) => {
        res.status(201).json(await records.createLabel(ctx, req.signedIn!, setId(req)));
      },
    },
    {
      method: 'get',
      path: '/api/sets/:id/labels',
      access: 'signed-in',
      summary: 'The set\u2019s provenance labels',
      validate: validate({ params: idParams, query: emptyQuery }),
      handler: async (req, res) => {
        res.json(await records.listLabels(ctx, req.signedIn!, setId(req)));
      },
    },
    {
      method: 'post',
      path: '/api/sets/:id/labels/:labelId/revoke',
      access: 'signed-in',
      summary: 'Revoke a provenance label (its link stops working)',
      validate: validate({ params: { ...idParams, labelId: ID } }),
      handler: async (req, res) => {
        res.json(await records.revokeLabel(ctx, req.signedIn!, setId(req), Number(req.params.labelId)));
      },
    },
    {
      method: 'get',
      path: '/api/public/labels/:token',
      access: 'public',
      summary: 'The read-only public record behind a provenance label (no owner identity)',
      validate: validate({ params: { token: TOKEN_PARAM }, query: emptyQuery }),
      handler: async (req, res) => {
        res.set('Cache-Control', 'no-store').set('X-Robots-Tag', 'noindex');
        res.json(await reports.publicRecord(ctx, String(req.params.token)));
      },
    },
    // Export
    {
      method: 'get',
      path: '/api/export/sets',
      access: 'signed-in',
      summary: 'The caller\u2019s own sets with their surveys and readings: JSON, or CSV one row per reading',
      validate: validate({ query: formatQuery }),
      handler: async (req, res) => {
        const doc = await reports.exportSets(ctx, req.signedIn!);
        const day = doc.exportedAt.slice(0, 10);
        if (validQuery<{ format: string }>(req).format === 'csv') {
          res.type('text/csv; charset=utf-8').set('Content-Disposition', `attachment; filename="driftmark-sets-${day}.csv"`).send(reports.exportCsv(doc));
        } else res.set('Content-Disposition', `attachment; filename="driftmark-sets-${day}.json"`).json(doc);
      },
    },
  ];
}
