/**
 * The public calculation API: no sign-in; a per-client rate limit and body limit set by
 * configuration. The handlers call the same domain functions as the browser (quick-check.ts).
 */
import type { RequestHandler } from 'express';
import { rateLimit } from 'express-rate-limit';
import type { AppConfig } from '../config';
import { ColourCodeError, decodeBands, decodeBodyTipDot, encodeBands, type Colour } from '../domain/colour-code';
import { dissipation, DissipationInputError, type DissipationInput } from '../domain/dissipation';
import { NetworkError } from '../domain/in-circuit';
import { parseResistance } from '../domain/notation';
import { preferred, type SeriesName } from '../domain/preferred-values';
import { checkNetwork, checkReading, QuickCheckError, type NetworkRequest, type VerdictRequest } from '../domain/quick-check';
import { badRequest, tooManyRequests } from '../http/errors';
import type { RouteDef } from '../http/route-table';
import { ajv, validate, validQuery } from '../http/validate';
import * as S from './calc.schemas';

/** Turns the domain's own refusals into a 400 naming the field. */
function domainCall<T>(fn: () => T): T {
  try {
    return fn();
  } catch (e) {
    if (e instanceof QuickCheckError || e instanceof NetworkError || e instanceof ColourCodeError) throw badRequest(e.message, e.field, 'invalid-value');
    if (e instanceof DissipationInputError) throw badRequest(e.problems[0]?.message ?? e.message, e.problems[0]?.field, 'invalid-value');
    if (e instanceof RangeError) throw badRequest(e.message, undefined, 'invalid-value');
    throw e;
  }
}

const bandsForm = ajv.compile({ type: 'object', properties: { bands: S.colourCodeBody.oneOf[0].properties.bands }, required: ['bands'], additionalProperties: false });
const bodyTipDotForm = ajv.compile({ type: 'object', properties: S.colourCodeBody.oneOf[1].properties, required: ['bodyTipDot'], additionalProperties: false });
const encodeForm = ajv.compile({ type: 'object', properties: S.colourCodeBody.oneOf[2].properties, required: ['ohms', 'bandCount', 'tolerancePct'], additionalProperties: false });

/** The colour-code body has three forms: pick by its keys, then validate that form. */
const validateColourCode: RequestHandler = (req, _res, next) => {
  const body = req.body as Record<string, unknown> | undefined;
  const form = body && typeof body === 'object' && !Array.isArray(body) ? ('bands' in body ? bandsForm : 'bodyTipDot' in body ? bodyTipDotForm : 'ohms' in body ? encodeForm : null) : null;
  if (!form) throw badRequest('Send {bands:[…]} to decode bands, {bodyTipDot:{body, tip, dot, end}} for an old composition part, or {ohms, bandCount, tolerancePct} to encode.', '(body)', 'validation');
  return validate({ body: form.schema as never })(req, _res, next);
};

export function calcRoutes(config: AppConfig): RouteDef[] {
  const limiter = rateLimit({
    windowMs: 60_000,
    limit: config.calc.rateLimitPerMinute,
    standardHeaders: 'draft-7',
    legacyHeaders: false,
    handler: (_req, _res, next, options) => next(tooManyRequests('Too many calculations from this address: wait a minute.', Math.ceil(options.windowMs / 1000))),
  });
  const before = [limiter];
  return [
    {
      method: 'post',
      path: '/api/calc/parse',
      access: 'public',
      summary: 'Parse a resistance as people write it',
      validate: validate({ body: S.parseBody as never }),
      before,
      handler: (req, res) => {
        const b = req.body as { text: string; serviceDataYear?: number };
        const r = parseResistance(b.text, { serviceDataYear: b.serviceDataYear });
        if (!r.ok) throw badRequest(r.message, 'text', 'unparseable');
        res.json({ state: r.state, ohms: r.ohms, tolerancePct: r.tolerancePct, display: r.display, code: r.code, warnings: r.warnings, notes: r.notes });
      },
    },
    {
      method: 'post',
      path: '/api/calc/color-code',
      access: 'public',
      summary: 'Decode colour bands (or body–tip–dot), or encode a value to bands (IEC 60062)',
      validate: validateColourCode,
      before,
      handler: (req, res) => {
        const b = req.body as { bands?: Colour[]; bodyTipDot?: Parameters<typeof decodeBodyTipDot>[0]; ohms?: number; bandCount?: 4 | 5; tolerancePct?: number };
        if (b.bands) return void res.json(domainCall(() => decodeBands(b.bands!)));
        if (b.bodyTipDot) return void res.json(domainCall(() => decodeBodyTipDot(b.bodyTipDot!)));
        res.json({ bands: domainCall(() => encodeBands(b.ohms!, b.bandCount!, b.tolerancePct!)) });
      },
    },
    {
      method: 'get',
      path: '/api/calc/preferred',
      access: 'public',
      summary: 'Nearest, below and above in an E-series (IEC 60063)',
      validate: validate({ query: S.preferredQuery as never }),
      before,
      handler: (req, res) => {
        const q = validQuery<{ ohms: number; series: SeriesName }>(req);
        res.json(domainCall(() => preferred(q.ohms, q.series)));
      },
    },
    {
      method: 'post',
      path: '/api/calc/verdict',
      access: 'public',
      summary: 'Judge one reading against its band with the meter accuracy',
      validate: validate({ body: S.verdictBody as never }),
      before,
      handler: (req, res) => {
        res.json(domainCall(() => checkReading(req.body as VerdictRequest)));
      },
    },
    {
      method: 'post',
      path: '/api/calc/network',
      access: 'public',
      summary: 'In-circuit expectation and the implied value of a part',
      validate: validate({ body: S.networkBody as never }),
      before,
      handler: (req, res) => {
        res.json(domainCall(() => checkNetwork(req.body as NetworkRequest)));
      },
    },
    {
      method: 'post',
      path: '/api/calc/dissipation',
      access: 'public',
      summary: 'Dissipation and the suggested rating',
      validate: validate({ body: S.dissipationBody as never }),
      before,
      handler: (req, res) => {
        res.json(domainCall(() => dissipation(req.body as DissipationInput)));
      },
    },
  ];
}
