/**
 * The bench (DESIGN.md §2 "set", "survey", "reading", "meter profile", "lifted-lead list",
 * "safety gates", "parts record", "bring-up log"): meter profiles, sets and what hangs off them,
 * surveys and their readings.
 *
 * Append-only records (gate signatures, amendments, lifted-lead events, bring-up entries, parts
 * record lines) are never updated in place by the use cases; a correction is a new row.
 */
import { sql } from 'drizzle-orm';
import { bigint, boolean, date, doublePrecision, index, integer, jsonb, pgEnum, pgTable, smallint, text, timestamp, uniqueIndex } from 'drizzle-orm/pg-core';
import { timestamps } from './columns';
import { chassisTemplates, templateVersions } from './templates';
import { users } from './users';

export const SURVEY_PURPOSE_VALUES = ['intake', 'after-repair', 'periodic', 'assignment'] as const;
export const surveyPurposeEnum = pgEnum('survey_purpose', SURVEY_PURPOSE_VALUES);
export const SURVEY_STATE_VALUES = ['draft', 'complete', 'submitted', 'returned', 'accepted'] as const;
export const surveyStateEnum = pgEnum('survey_state', SURVEY_STATE_VALUES);
export const READING_STATE_VALUES = ['value', 'open', 'over-range', 'short', 'climbing', 'unstable', 'no-access'] as const;
export const readingStateEnum = pgEnum('reading_state', READING_STATE_VALUES);
export const METHOD_VALUES = ['in-circuit', 'lead-lifted', 'out-of-circuit'] as const;
export const methodEnum = pgEnum('reading_method', METHOD_VALUES);

/** A user's meter (api/domain/meter.ts MeterProfile in `profile`), with its check resistor. */
export const meterProfiles = pgTable(
  'meter_profiles',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    ownerId: integer('owner_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    name: text('name').notNull(),
    /** MeterProfile: kind, leadOhms, ranges (and autorange for digital). */
    profile: jsonb('profile').notNull(),
    /** `calibration` (a lab certificate) or `check` (the user's own against references). */
    checkKind: text('check_kind').notNull().default('check'),
    checkDate: date('check_date'),
    /** The check resistor's known value, measured at the start of each survey. */
    checkResistorOhms: doublePrecision('check_resistor_ohms'),
    checkResistorTolerancePct: doublePrecision('check_resistor_tolerance_pct'),
    archived: boolean('archived').notNull().default(false),
    version: integer('version').notNull().default(1),
    ...timestamps,
  },
  (t) => [index('meter_profiles_owner_idx').on(t.ownerId)],
);

/** One physical radio or amplifier. */
export const sets = pgTable(
  'sets',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    ownerId: integer('owner_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    templateId: integer('template_id')
      .notNull()
      .references(() => chassisTemplates.id, { onDelete: 'restrict' }),
    /** Owner or collection label (a museum's collection, a shop's customer). */
    label: text('label').notNull(),
    accessionNumber: text('accession_number').notNull().default(''),
    customer: text('customer').notNull().default(''),
    /** A shop's job status (free list in api/domain/set-format.ts JOB_STATUSES). */
    jobStatus: text('job_status').notNull().default('intake'),
    serial: text('serial').notNull().default(''),
    /** conserve · repair · refurbish · restore */
    restorationLevel: text('restoration_level').notNull().default('repair'),
    condition: text('condition').notNull().default(''),
    complaint: text('complaint').notNull().default(''),
    intakeNotes: text('intake_notes').notNull().default(''),
    /** SetDeviation[] (api/domain/set-format.ts). */
    deviations: jsonb('deviations').notNull().default(sql`'[]'::jsonb`),
    /** Set when "ready for first power" was recorded (gates closed, no lifted lead open). */
    firstPowerAt: timestamp('first_power_at', { withTimezone: true }),
    firstPowerBy: integer('first_power_by').references(() => users.id, { onDelete: 'set null' }),
    /** Optimistic concurrency of set edits. */
    version: integer('version').notNull().default(1),
    ...timestamps,
  },
  (t) => [index('sets_owner_idx').on(t.ownerId, t.updatedAt.desc()), index('sets_template_idx').on(t.templateId)],
);

/** A set shared with another user (who may see and edit it). */
export const setShares = pgTable(
  'set_shares',
  {
    setId: integer('set_id')
      .notNull()
      .references(() => sets.id, { onDelete: 'cascade' }),
    userId: integer('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex('set_shares_pk_idx').on(t.setId, t.userId), index('set_shares_user_idx').on(t.userId)],
);

/** What is in each socket of the set (one current record per socket; history in `history`). */
export const tubeRecords = pgTable(
  'tube_records',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    setId: integer('set_id')
      .notNull()
      .references(() => sets.id, { onDelete: 'cascade' }),
    socketKey: text('socket_key').notNull(),
    /** present · missing · wrong-type · replaced */
    status: text('status').notNull(),
    /** The type found in the socket (a wrong type names it). */
    foundType: text('found_type').notNull().default(''),
    /** Free text of a tube tester's result (e.g. "72 % of new, no shorts"). */
    testResult: text('test_result').notNull().default(''),
    note: text('note').notNull().default(''),
    recordedBy: integer('recorded_by').references(() => users.id, { onDelete: 'set null' }),
    ...timestamps,
  },
  (t) => [uniqueIndex('tube_records_socket_idx').on(t.setId, t.socketKey)],
);

/** Photos of a set (intake photos) or of a reading; blobs through api/storage. */
export const setFiles = pgTable(
  'set_files',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    setId: integer('set_id')
      .notNull()
      .references(() => sets.id, { onDelete: 'cascade' }),
    readingId: bigint('reading_id', { mode: 'number' }),
    storageKey: text('storage_key').notNull(),
    thumbnailKey: text('thumbnail_key'),
    originalName: text('original_name').notNull(),
    mimeType: text('mime_type').notNull(),
    bytes: integer('bytes').notNull(),
    caption: text('caption').notNull().default(''),
    uploadedBy: integer('uploaded_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index('set_files_set_idx').on(t.setId)],
);

/** One pass of readings on one set against one template version. */
export const surveys = pgTable(
  'surveys',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    setId: integer('set_id')
      .notNull()
      .references(() => sets.id, { onDelete: 'cascade' }),
    templateVersionId: integer('template_version_id')
      .notNull()
      .references(() => templateVersions.id, { onDelete: 'restrict' }),
    /** The version number (denormalised for display). */
    versionNumber: integer('version_number').notNull(),
    purpose: surveyPurposeEnum('purpose').notNull(),
    state: surveyStateEnum('state').notNull().default('draft'),
    meterProfileId: integer('meter_profile_id').references(() => meterProfiles.id, { onDelete: 'set null' }),
    /** The meter profile as it was when the survey started (name, MeterProfile, check date). */
    meter: jsonb('meter'),
    /** AcceptanceRule (api/domain/verdict.ts). */
    rule: jsonb('rule').notNull(),
    /** SurveyConditions (api/domain/set-format.ts). */
    conditions: jsonb('conditions').notNull(),
    /** The check-resistor reading at the start: { text, ohms, knownOhms, ok, message, at }. */
    meterCheck: jsonb('meter_check'),
    /** The survey whose points, order and conditions this one carried over. */
    carriedFromSurveyId: integer('carried_from_survey_id'),
    startedBy: integer('started_by').references(() => users.id, { onDelete: 'set null' }),
    completedAt: timestamp('completed_at', { withTimezone: true }),
    completedBy: integer('completed_by').references(() => users.id, { onDelete: 'set null' }),
    /** Test points whose path joints and contacts were marked checked: { [testPointKey]: { by, at } }. */
    jointChecks: jsonb('joint_checks').notNull().default(sql`'{}'::jsonb`),
    /** Classes issue: the assignment this survey answers (null outside a class). */
    assignmentId: integer('assignment_id'),
    /** A returned assignment survey: the test points the student may re-measure (null: none open). */
    remeasureKeys: text('remeasure_keys').array(),
    version: integer('version').notNull().default(1),
    ...timestamps,
  },
  (t) => [
    index('surveys_set_idx').on(t.setId, t.createdAt),
    index('surveys_version_idx').on(t.templateVersionId),
    index('surveys_assignment_idx').on(t.assignmentId, t.startedBy),
  ],
);

/** One entry for a test point in a survey; several per test point (follow-ups, re-checks). */
export const readings = pgTable(
  'readings',
  {
    id: bigint('id', { mode: 'number' }).primaryKey().generatedAlwaysAsIdentity(),
    surveyId: integer('survey_id')
      .notNull()
      .references(() => surveys.id, { onDelete: 'cascade' }),
    testPointKey: text('test_point_key').notNull(),
    /** Made by the client (crypto.getRandomValues); a replay with the same key is the same write. */
    clientKey: text('client_key').notNull(),
    followsReadingId: bigint('follows_reading_id', { mode: 'number' }),
    /** As typed (`470k`, `OL`), or '' for a state key. */
    text: text('text').notNull().default(''),
    state: readingStateEnum('state').notNull(),
    ohms: doublePrecision('ohms'),
    method: methodEnum('method').notNull().default('in-circuit'),
    /** lead-lifted only: which end of the component was lifted (0 = nodes[0], 1 = nodes[1]). */
    liftedEnd: smallint('lifted_end'),
    rangeIndex: smallint('range_index'),
    note: text('note').notNull().default(''),
    /** Predict-first (classes issue): the predicted in-circuit reading, text as typed. */
    prediction: text('prediction'),
    enteredBy: integer('entered_by').references(() => users.id, { onDelete: 'set null' }),
    /** When the reading was taken at the bench (the client's clock), and when the server stored it. */
    takenAt: timestamp('taken_at', { withTimezone: true }).notNull().defaultNow(),
    version: integer('version').notNull().default(1),
    ...timestamps,
  },
  (t) => [uniqueIndex('readings_client_key_idx').on(t.surveyId, t.clientKey), index('readings_survey_idx').on(t.surveyId, t.id)],
);

/** A change to a complete (or accepted) survey: who, when, why, and what. */
export const surveyAmendments = pgTable(
  'survey_amendments',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    surveyId: integer('survey_id')
      .notNull()
      .references(() => surveys.id, { onDelete: 'cascade' }),
    readingId: bigint('reading_id', { mode: 'number' }),
    reason: text('reason').notNull(),
    /** { before, after } of what changed. */
    change: jsonb('change').notNull(),
    amendedBy: integer('amended_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index('survey_amendments_survey_idx').on(t.surveyId)],
);

/** A physical lead lifted for an out-of-circuit reading, until re-soldered. */
export const liftedLeads = pgTable(
  'lifted_leads',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    setId: integer('set_id')
      .notNull()
      .references(() => sets.id, { onDelete: 'cascade' }),
    surveyId: integer('survey_id').references(() => surveys.id, { onDelete: 'set null' }),
    componentKey: text('component_key').notNull(),
    /** The component's reference at the time (R12), for lists that outlive template changes. */
    componentRef: text('component_ref').notNull(),
    /** 0 = nodes[0], 1 = nodes[1]. */
    end: smallint('end').notNull(),
    node: text('node').notNull(),
    /** The in-circuit reading that prompted the lift, and the follow-up taken with the lead lifted. */
    promptedByReadingId: bigint('prompted_by_reading_id', { mode: 'number' }),
    liftedBy: integer('lifted_by').references(() => users.id, { onDelete: 'set null' }),
    liftedAt: timestamp('lifted_at', { withTimezone: true }).notNull().defaultNow(),
    resolderedBy: integer('resoldered_by').references(() => users.id, { onDelete: 'set null' }),
    resolderedAt: timestamp('resoldered_at', { withTimezone: true }),
    recheckReadingId: bigint('recheck_reading_id', { mode: 'number' }),
    note: text('note').notNull().default(''),
  },
  (t) => [index('lifted_leads_set_idx').on(t.setId), index('lifted_leads_open_idx').on(t.setId).where(sql`${t.resolderedAt} is null`)],
);

/** The parts record: per component, kept / replaced / left, append-only (the newest line counts). */
export const partsRecord = pgTable(
  'parts_record',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    setId: integer('set_id')
      .notNull()
      .references(() => sets.id, { onDelete: 'cascade' }),
    componentKey: text('component_key').notNull(),
    componentRef: text('component_ref').notNull(),
    /** kept · replaced · left */
    action: text('action').notNull(),
    /** replaced: { text, ohms, uF, watts, volts, kind, measuredText, measuredOhms }. */
    newPart: jsonb('new_part'),
    readingId: bigint('reading_id', { mode: 'number' }),
    /** Required when no reading prompted it (e.g. capacitors replaced by policy). */
    reason: text('reason').notNull().default(''),
    note: text('note').notNull().default(''),
    recordedBy: integer('recorded_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index('parts_record_set_idx').on(t.setId, t.componentKey)],
);

/** Ordered / received marks on the replacement list, per component. */
export const replacementMarks = pgTable(
  'replacement_marks',
  {
    setId: integer('set_id')
      .notNull()
      .references(() => sets.id, { onDelete: 'cascade' }),
    componentKey: text('component_key').notNull(),
    orderedAt: timestamp('ordered_at', { withTimezone: true }),
    receivedAt: timestamp('received_at', { withTimezone: true }),
    updatedBy: integer('updated_by').references(() => users.id, { onDelete: 'set null' }),
    updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex('replacement_marks_pk_idx').on(t.setId, t.componentKey)],
);

/** A safety-gate item signed (or re-opened): append-only, the newest record per item counts. */
export const gateSignatures = pgTable(
  'gate_signatures',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    setId: integer('set_id')
      .notNull()
      .references(() => sets.id, { onDelete: 'cascade' }),
    itemKey: text('item_key').notNull(),
    /** signed · reopened */
    action: text('action').notNull(),
    note: text('note').notNull().default(''),
    signedBy: integer('signed_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index('gate_signatures_set_idx').on(t.setId, t.itemKey, t.id)],
);

/** The bring-up log: limiter-lamp or variac steps after first power is recorded. */
export const bringUpEntries = pgTable(
  'bring_up_entries',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    setId: integer('set_id')
      .notNull()
      .references(() => sets.id, { onDelete: 'cascade' }),
    /** limiter-lamp · variac · direct */
    step: text('step').notNull(),
    /** "60 W lamp", "variac 50 %". */
    setting: text('setting').notNull().default(''),
    mainsVolts: doublePrecision('mains_volts'),
    currentAmps: doublePrecision('current_amps'),
    /** [{ node, volts }] first B+ readings. */
    bPlus: jsonb('b_plus').notNull().default(sql`'[]'::jsonb`),
    /** smoke · smell · hum · arcing · hot-part … */
    observations: text('observations').array().notNull().default(sql`'{}'::text[]`),
    note: text('note').notNull().default(''),
    recordedBy: integer('recorded_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index('bring_up_entries_set_idx').on(t.setId, t.id)],
);

/** A provenance label's public link: an unguessable token, revocable. */
export const provenanceLabels = pgTable(
  'provenance_labels',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    setId: integer('set_id')
      .notNull()
      .references(() => sets.id, { onDelete: 'cascade' }),
    /** SHA-256 of the token (hex); the token itself is shown once and then only in the label's QR. */
    tokenHash: text('token_hash').notNull(),
    /** The token, kept to re-print the label; null once revoked. */
    token: text('token'),
    createdBy: integer('created_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    revokedAt: timestamp('revoked_at', { withTimezone: true }),
  },
  (t) => [uniqueIndex('provenance_labels_token_idx').on(t.tokenHash), index('provenance_labels_set_idx').on(t.setId)],
);
