/** JSON-schema pieces of the classes' requests (api/domain/class-format.ts shapes). */
import type { JSONSchemaType } from 'ajv';
import { COMPETENCIES, type AssignmentInput, type AssignmentPatch, type ClassInput, type ClassPatch, type CompetencyKey, type InvitationAccept, type InvitationInput } from '../domain/class-format';
import { email, password, personName } from '../http/validate';
import { id, line, object, paragraph, rule } from '../sets/set-schema';

/** An invitation token in a path: 32 random bytes, base64url (43 characters; 16–200 accepted as elsewhere). */
export const INVITATION_TOKEN = /^[A-Za-z0-9_-]{16,200}$/;

const className = line(120, 1);
const term = line(80);
const title = line(200, 1);
/** An ISO 8601 date and time with its offset (`2027-03-14T17:00:00Z`). */
const dateTime = { type: 'string', format: 'date-time', maxLength: 40 } as const;
const nullableId = { type: ['integer', 'null'], minimum: 1, maximum: 2147483647 } as const;

export const classBody = object({ name: className, term }, ['name']) as unknown as JSONSchemaType<ClassInput>;
export const classPatchBody = object({ name: className, term, archived: { type: 'boolean' } }, [], { minProperties: 1 }) as unknown as JSONSchemaType<ClassPatch>;
export const invitationBody = object({
  emails: { type: 'array', minItems: 1, maxItems: 50, items: email },
}) as unknown as JSONSchemaType<InvitationInput>;
export const acceptBody = object({ name: personName, password }) as unknown as JSONSchemaType<InvitationAccept>;
/** The join takes no fields (an empty JSON object). */
export const joinBody = object({}, []) as unknown as JSONSchemaType<Record<string, never>>;

export const assignmentBody = object(
  {
    title,
    instructions: paragraph(8000),
    templateId: id,
    versionNumber: id,
    setId: id,
    dueAt: dateTime,
    rule,
    referenceSurveyId: nullableId,
    predictFirst: { type: 'boolean' },
    showVerdicts: { type: 'boolean' },
  },
  ['title', 'templateId', 'versionNumber', 'setId', 'dueAt'],
) as unknown as JSONSchemaType<AssignmentInput>;

export const assignmentPatchBody = object(
  { title, instructions: paragraph(8000), dueAt: dateTime, referenceSurveyId: nullableId, predictFirst: { type: 'boolean' }, showVerdicts: { type: 'boolean' } },
  [],
  { minProperties: 1 },
) as unknown as JSONSchemaType<AssignmentPatch>;

export interface SignOffInput {
  competencyKey: CompetencyKey;
  classId?: number;
  note?: string;
}
export const signOffBody = object(
  { competencyKey: { type: 'string', enum: COMPETENCIES.map((c) => c.key) }, classId: id, note: paragraph(2000) },
  ['competencyKey'],
) as unknown as JSONSchemaType<SignOffInput>;

/** A withdrawal says why. */
export const withdrawBody = object({ note: { ...paragraph(2000), minLength: 1 } }) as unknown as JSONSchemaType<{ note: string }>;
