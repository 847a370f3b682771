/**
 * Chassis templates (DESIGN.md §2 "chassis template", /tmp design note of the lead): the template's
 * identity row, its versions (one JSON document each: api/domain/template-format.ts), sharing,
 * corrections, files, and the shared tube-type library.
 *
 * A PostgreSQL trigger (migration 0002, hand-written) keeps published and retired versions
 * immutable: their content never changes and they are never deleted; the only change allowed is
 * `published → retired`.
 */
import { relations, sql } from 'drizzle-orm';
import { type AnyPgColumn, doublePrecision, index, integer, jsonb, pgEnum, pgTable, text, timestamp, uniqueIndex } from 'drizzle-orm/pg-core';
import { timestamps } from './columns';
import { users } from './users';

export const TEMPLATE_VERSION_STATES = ['draft', 'published', 'retired'] as const;
export const templateVersionStateEnum = pgEnum('template_version_state', TEMPLATE_VERSION_STATES);

export const TEMPLATE_VISIBILITIES = ['private', 'shared', 'public'] as const;
export type TemplateVisibility = (typeof TEMPLATE_VISIBILITIES)[number];
export const templateVisibilityEnum = pgEnum('template_visibility', TEMPLATE_VISIBILITIES);

export const CHASSIS_KIND_VALUES = ['table-radio', 'console', 'portable', 'communications-receiver', 'amplifier', 'other'] as const;
export const chassisKindEnum = pgEnum('chassis_kind', CHASSIS_KIND_VALUES);

export const POWER_VALUES = ['transformer', 'autotransformer', 'ac-dc', 'battery'] as const;
export const powerArrangementEnum = pgEnum('power_arrangement', POWER_VALUES);

export const CORRECTION_STATES = ['open', 'accepted', 'declined'] as const;
export type CorrectionState = (typeof CORRECTION_STATES)[number];
export const correctionStateEnum = pgEnum('correction_state', CORRECTION_STATES);

export const CORRECTION_TARGETS = ['component', 'test-point'] as const;
export type CorrectionTarget = (typeof CORRECTION_TARGETS)[number];
export const correctionTargetEnum = pgEnum('correction_target', CORRECTION_TARGETS);

export const HEATING_VALUES = ['indirect', 'direct'] as const;
export const heatingEnum = pgEnum('heating', HEATING_VALUES);

/** The shared tube-type library (a record entered once; sockets name it by designation). */
export const tubeTypes = pgTable(
  'tube_types',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    /** Stored upper-case (`12BE6`); unique. */
    designation: text('designation').notNull(),
    /** A key of the base-geometry table in code (`noval`, `octal` …). */
    base: text('base').notNull(),
    heating: heatingEnum('heating').notNull(),
    heaterVolts: doublePrecision('heater_volts').notNull(),
    heaterAmps: doublePrecision('heater_amps').notNull(),
    /** `[{ pin, electrode, label }]` (api/domain/template-format.ts TubePin). */
    pins: jsonb('pins').notNull(),
    /** `[[2, 7]]`: internally joined pins that are one node. */
    ties: jsonb('ties').notNull().default(sql`'[]'::jsonb`),
    notes: text('notes').notNull().default(''),
    createdBy: integer('created_by').references(() => users.id, { onDelete: 'set null' }),
    ...timestamps,
  },
  (t) => [uniqueIndex('tube_types_designation_idx').on(t.designation), index('tube_types_designation_trgm_idx').using('gin', sql`${t.designation} gin_trgm_ops`)],
);

/**
 * A chassis template's identity. The library columns (maker … component_count) are copied by the
 * use cases from the "library version": the newest published version, else the newest retired
 * one, else the draft — so a search never opens a JSON document.
 */
export const chassisTemplates = pgTable(
  'chassis_templates',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    ownerId: integer('owner_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    maker: text('maker').notNull(),
    model: text('model').notNull(),
    chassisNumber: text('chassis_number').notNull().default(''),
    kind: chassisKindEnum('kind').notNull(),
    power: powerArrangementEnum('power').notNull(),
    yearFrom: integer('year_from'),
    yearTo: integer('year_to'),
    visibility: templateVisibilityEnum('visibility').notNull().default('private'),
    /** Optimistic concurrency of the draft: bumped by every draft write and by publishing. */
    revision: integer('revision').notNull().default(1),
    copiedFromTemplateId: integer('copied_from_template_id').references((): AnyPgColumn => chassisTemplates.id, { onDelete: 'set null' }),
    copiedFromVersionId: integer('copied_from_version_id').references((): AnyPgColumn => templateVersions.id, { onDelete: 'set null' }),
    copiedFromVersionNumber: integer('copied_from_version_number'),
    /** The origin's author, kept as text: the credit survives the original's deletion. */
    originAuthorName: text('origin_author_name'),
    /** Lower-case maker, model, chassis number, variants, tube types and author: the `q` search. */
    searchText: text('search_text').notNull().default(''),
    tubeTypes: text('tube_types').array().notNull().default(sql`'{}'::text[]`),
    stageCount: integer('stage_count').notNull().default(0),
    testPointCount: integer('test_point_count').notNull().default(0),
    componentCount: integer('component_count').notNull().default(0),
    /** Newest published (not retired) version number; null while nothing is published. */
    latestPublishedNumber: integer('latest_published_number'),
    /** Published and retired versions. */
    versionCount: integer('version_count').notNull().default(0),
    /** Surveys that used a version of this template (kept by the surveys issue; 0 until then). */
    surveyCount: integer('survey_count').notNull().default(0),
    ...timestamps,
  },
  (t) => [
    index('chassis_templates_owner_idx').on(t.ownerId),
    index('chassis_templates_search_trgm_idx').using('gin', sql`${t.searchText} gin_trgm_ops`),
    index('chassis_templates_maker_trgm_idx').using('gin', sql`${t.maker} gin_trgm_ops`),
    index('chassis_templates_model_trgm_idx').using('gin', sql`${t.model} gin_trgm_ops`),
    index('chassis_templates_chassis_trgm_idx').using('gin', sql`${t.chassisNumber} gin_trgm_ops`),
    index('chassis_templates_tube_types_idx').using('gin', t.tubeTypes),
    index('chassis_templates_use_idx').on(t.surveyCount.desc(), t.id.desc()),
    index('chassis_templates_updated_idx').on(t.updatedAt.desc(), t.id.desc()),
    index('chassis_templates_kind_idx').on(t.kind),
  ],
);

/**
 * One version of a template: its whole content is one document (formatVersion 1). At most one
 * draft per template (number null); published versions are numbered 1, 2, … per template.
 */
export const templateVersions = pgTable(
  'template_versions',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    templateId: integer('template_id')
      .notNull()
      .references(() => chassisTemplates.id, { onDelete: 'cascade' }),
    state: templateVersionStateEnum('state').notNull(),
    number: integer('number'),
    content: jsonb('content').notNull(),
    /** The draft revision this content was written (or published) at. */
    revision: integer('revision').notNull(),
    changelog: text('changelog'),
    publishedAt: timestamp('published_at', { withTimezone: true }),
    publishedBy: integer('published_by').references(() => users.id, { onDelete: 'set null' }),
    retiredAt: timestamp('retired_at', { withTimezone: true }),
    retiredBy: integer('retired_by').references(() => users.id, { onDelete: 'set null' }),
    retiredReason: text('retired_reason'),
    tubeTypes: text('tube_types').array().notNull().default(sql`'{}'::text[]`),
    stageCount: integer('stage_count').notNull().default(0),
    testPointCount: integer('test_point_count').notNull().default(0),
    componentCount: integer('component_count').notNull().default(0),
    ...timestamps,
  },
  (t) => [
    uniqueIndex('template_versions_number_idx').on(t.templateId, t.number),
    uniqueIndex('template_versions_one_draft_idx')
      .on(t.templateId)
      .where(sql`${t.state} = 'draft'`),
    index('template_versions_tube_types_idx').using('gin', t.tubeTypes),
  ],
);

/** Shared with named users (class shares come with the classes issue: `class_id`). */
export const templateShares = pgTable(
  'template_shares',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    templateId: integer('template_id')
      .notNull()
      .references(() => chassisTemplates.id, { onDelete: 'cascade' }),
    userId: integer('user_id').references(() => users.id, { onDelete: 'cascade' }),
    classId: integer('class_id'),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex('template_shares_user_idx').on(t.templateId, t.userId), index('template_shares_by_user_idx').on(t.userId)],
);

/** A correction sent to the author on one component or test point of a version. */
export const templateCorrections = pgTable(
  'template_corrections',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    templateId: integer('template_id')
      .notNull()
      .references(() => chassisTemplates.id, { onDelete: 'cascade' }),
    versionId: integer('version_id').references(() => templateVersions.id, { onDelete: 'set null' }),
    versionNumber: integer('version_number').notNull(),
    targetKind: correctionTargetEnum('target_kind').notNull(),
    targetKey: text('target_key').notNull(),
    /** The proposed fields of the component or test point. */
    change: jsonb('change').notNull(),
    note: text('note').notNull(),
    authorId: integer('author_id').references(() => users.id, { onDelete: 'set null' }),
    state: correctionStateEnum('state').notNull().default('open'),
    decisionNote: text('decision_note'),
    decidedAt: timestamp('decided_at', { withTimezone: true }),
    decidedBy: integer('decided_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index('template_corrections_template_idx').on(t.templateId, t.state), index('template_corrections_author_idx').on(t.authorId)],
);

/** Schematics and photos on a template or a stage (uploads arrive with the files work). */
export const templateFiles = pgTable(
  'template_files',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    templateId: integer('template_id')
      .notNull()
      .references(() => chassisTemplates.id, { onDelete: 'cascade' }),
    /** null = the whole template. */
    stageKey: text('stage_key'),
    storageKey: text('storage_key').notNull(),
    originalName: text('original_name').notNull(),
    mediaType: text('media_type').notNull(),
    bytes: integer('bytes').notNull(),
    width: integer('width'),
    height: integer('height'),
    /** One line of free text shown under the file ('' = none). */
    caption: text('caption').notNull().default(''),
    createdBy: integer('created_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index('template_files_template_idx').on(t.templateId), uniqueIndex('template_files_storage_idx').on(t.storageKey)],
);

export const chassisTemplatesRelations = relations(chassisTemplates, ({ one, many }) => ({
  owner: one(users, { fields: [chassisTemplates.ownerId], references: [users.id] }),
  versions: many(templateVersions),
  shares: many(templateShares),
  corrections: many(templateCorrections),
  files: many(templateFiles),
}));

export const templateVersionsRelations = relations(templateVersions, ({ one }) => ({
  template: one(chassisTemplates, { fields: [templateVersions.templateId], references: [chassisTemplates.id] }),
}));

export const templateSharesRelations = relations(templateShares, ({ one }) => ({
  template: one(chassisTemplates, { fields: [templateShares.templateId], references: [chassisTemplates.id] }),
  user: one(users, { fields: [templateShares.userId], references: [users.id] }),
}));

export const templateCorrectionsRelations = relations(templateCorrections, ({ one }) => ({
  template: one(chassisTemplates, { fields: [templateCorrections.templateId], references: [chassisTemplates.id] }),
  version: one(templateVersions, { fields: [templateCorrections.versionId], references: [templateVersions.id] }),
}));

export const templateFilesRelations = relations(templateFiles, ({ one }) => ({
  template: one(chassisTemplates, { fields: [templateFiles.templateId], references: [chassisTemplates.id] }),
}));
