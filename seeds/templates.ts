/**
 * Demo templates: the shared tube types the demo uses and the three invented chassis
 * (seeds/chassis), owned by the demo author, made through the real use cases (so every document
 * passes the same checks as one typed in the editor):
 *   (a) the AC/DC table set: version 1 published, public, a correction from the demo technician waiting;
 *   (b) the console: two published versions (its pair relations arrived with version 2), public;
 *   (c) the amplifier: version 1 published, public.
 */
import { eq, sql } from 'drizzle-orm';
import type { Db } from '../api/db';
import type { Component, TemplateDocument } from '../api/domain/template-format';
import { proposeCorrection } from '../api/templates/corrections.use-cases';
import { createTemplate, publish, saveDraft, share } from '../api/templates/templates.use-cases';
import { createTubeType } from '../api/tube-types/tube-types.use-cases';
import { tubeTypes, users } from '../schema/index';
import { kestrel5, larkspur7p, quenbyQa10 } from './chassis/index';
import { DEMO_TUBE_TYPES } from './tube-types';

const AUTHOR_EMAIL = 'author@driftmark.example';
const TECH_EMAIL = 'tech@driftmark.example';

async function userId(db: Db, email: string): Promise<number> {
  const [u] = await db.select({ id: users.id }).from(users).where(sql`lower(${users.email}) = ${email}`);
  if (!u) throw new Error(`The demo account ${email} is missing: seed the accounts first.`);
  return u.id;
}

/** An earlier, shorter version of a document: its component checks only (no chart readings, no pair relations). */
function componentChecksOnly(doc: TemplateDocument): TemplateDocument {
  const out = structuredClone(doc);
  out.testPoints = out.testPoints.filter((t) => t.kind === 'component-check');
  return out;
}

/** Seeds the demo tube types and templates; returns how many templates were created. */
export async function seedDemoTemplates(db: Db): Promise<number> {
  const deps = { db };
  const author = { id: await userId(db, AUTHOR_EMAIL), roles: ['author', 'technician'] as const };
  const tech = { id: await userId(db, TECH_EMAIL), roles: ['technician'] as const };

  for (const t of DEMO_TUBE_TYPES) {
    const [exists] = await db.select({ id: tubeTypes.id }).from(tubeTypes).where(eq(tubeTypes.designation, t.designation));
    if (!exists) await createTubeType(deps, author, { ...t, ties: t.ties.map(([a, b]) => [a, b] as [number, number]) });
  }

  // (a) AC/DC table set, with a correction waiting.
  const a = kestrel5();
  const ta = await createTemplate(deps, author, { document: a });
  await publish(deps, author, ta.id, 'First issue, from the service sheet and a known-good set');
  await share(deps, author, ta.id, { visibility: 'public', userIds: [] });
  const part = a.components.find((c: Component) => c.kind === 'carbon-composition' && c.tolerancePct !== null && 'ohms' in c.nominal);
  if (part) {
    await proposeCorrection(deps, tech, ta.id, {
      versionNumber: 1,
      target: { kind: 'component', key: part.key },
      change: { tolerancePct: part.tolerancePct === 10 ? 5 : 10 },
      note: `${part.ref} on my set carries a ${part.tolerancePct === 10 ? 'gold' : 'silver'} tolerance band.`,
    });
  }

  // (b) Console, two published versions.
  const b = larkspur7p();
  const tb = await createTemplate(deps, author, { document: componentChecksOnly(b) });
  let revision = (await publish(deps, author, tb.id, 'First issue: component checks')).revision!;
  revision = (await saveDraft(deps, author, tb.id, { revision, content: b })).revision;
  await publish(deps, author, tb.id, 'Matched positions of the push-pull output added as pair relations');
  await share(deps, author, tb.id, { visibility: 'public', userIds: [] });

  // (c) Amplifier.
  const tc = await createTemplate(deps, author, { document: quenbyQa10() });
  await publish(deps, author, tc.id, 'First issue');
  await share(deps, author, tc.id, { visibility: 'public', userIds: [] });
  return 3;
}
