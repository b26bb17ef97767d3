/**
 * Every message a schema can give a person is in plain words: walks each request schema the app
 * and the server share, sends each field every wrong kind of value (and nested fields, and list
 * entries), and fails on zod's own wording ("Invalid input: expected string, received undefined",
 * "Invalid UUID", "Too big: expected string to have <=20 characters"...).
 */
import { z } from 'zod';
import * as audits from '../../../shared/schemas/audits';
import * as auth from '../../../shared/schemas/auth';
import * as board from '../../../shared/schemas/board';
import * as exportsSchemas from '../../../shared/schemas/exports';
import { limited, textLimit } from '../../../shared/schemas/fields';
import * as findings from '../../../shared/schemas/findings';
import * as preferences from '../../../shared/schemas/preferences';
import * as session from '../../../shared/schemas/session';
import * as setup from '../../../shared/schemas/setup';
import * as testRecords from '../../../shared/schemas/testRecords';

/** zod's English wording (zod/v4/locales/en), and words a person should never read at a field. */
const ZOD_WORDING = [/^Invalid\b/, /^Too (big|small)\b/, /^Unrecognized key/, /expected .* received/i, /^Required$/, /\bexpected\b.*[<>]=?/i, /\b(undefined|NaN)\b/];

const WRONG: unknown[] = [undefined, null, 0, -1, 1.5, 1e12, true, '', ' ', 'x', 'not-an-id', '2024-13-45', 'x'.repeat(70_000), [], ['x'], [{}], {}];

type Schema = z.ZodType;
const def = (s: Schema) => (s as unknown as { _zod: { def: Record<string, unknown> & { type: string } } })._zod.def;

function unwrap(s: Schema): Schema {
  const d = def(s);
  if (['optional', 'nullable', 'default', 'prefault', 'catch', 'readonly', 'nonoptional'].includes(d.type)) return unwrap(d.innerType as Schema);
  if (d.type === 'pipe') return unwrap(d.in as Schema);
  if (d.type === 'lazy') return unwrap((d.getter as () => Schema)());
  return s;
}

function shapeOf(s: Schema): Record<string, Schema> | null {
  const inner = unwrap(s);
  return def(inner).type === 'object' ? (def(inner).shape as Record<string, Schema>) : null;
}

/** Wrong values for one field: every wrong kind, and the same one level down (object fields, list entries). */
function wrongFor(field: Schema, depth = 0): unknown[] {
  const out = [...WRONG];
  if (depth >= 3) return out;
  const inner = unwrap(field);
  const shape = shapeOf(inner);
  if (shape) for (const [key, sub] of Object.entries(shape)) for (const v of wrongFor(sub, depth + 1)) out.push({ [key]: v });
  if (def(inner).type === 'array') for (const v of wrongFor(def(inner).element as Schema, depth + 1)) out.push([v]);
  return out;
}

const modules = { audits, auth, board, exports: exportsSchemas, findings, preferences, session, setup, testRecords };
const schemas = Object.entries(modules).flatMap(([mod, exported]) =>
  Object.entries(exported)
    .filter((e): e is [string, Schema] => e[1] instanceof z.ZodType)
    .map(([name, schema]) => [`${mod}.${name}`, schema] as const),
);

function messagesOf(schema: Schema): { path: string; message: string }[] {
  const shape = shapeOf(schema);
  const inputs = shape ? [{}, ...Object.entries(shape).flatMap(([key, field]) => wrongFor(field).map((v) => ({ [key]: v })))] : wrongFor(schema);
  const found: { path: string; message: string }[] = [];
  for (const input of inputs) {
    const result = schema.safeParse(input);
    if (!result.success) for (const issue of result.error.issues) found.push({ path: issue.path.join('.'), message: issue.message });
  }
  return found;
}

describe('schema messages are in plain words', () => {
  it('finds the request schemas', () => {
    expect(schemas.length).toBeGreaterThan(60);
    expect(schemas.map(([name]) => name)).toEqual(expect.arrayContaining(['findings.createFindingSchema', 'setup.createCatalogueItemSchema', 'preferences.preferencesFormSchema']));
  });

  it.each(schemas)('%s', (_name, schema) => {
    const bad = messagesOf(schema).filter(({ message }) => ZOD_WORDING.some((re) => re.test(message)));
    expect(bad.slice(0, 5)).toEqual([]);
  });

  it('a schema with no message of its own still speaks plainly (the plain-words map is installed)', () => {
    expect(ZOD_WORDING.some((re) => re.test('Invalid input: expected string, received number'))).toBe(true);
    const raw = z.object({ n: z.number(), id: z.uuid() }).safeParse({ n: 'x', id: 'y' });
    expect(raw.error?.issues.map((i) => i.message)).toEqual(['Type a number here.', 'Choose one from the list.']);
  });

  it('says what to do for a defect type that is not one of the job’s', () => {
    const result = findings.createFindingSchema.safeParse({ catalogueItemId: 'defect 3', unitId: '00000000-0000-4000-8000-000000000000' });
    expect(result.error?.issues.find((i) => i.path[0] === 'catalogueItemId')?.message).toBe('Choose the defect from the list, or describe it under Something else.');
  });

  it('words a text over its limit with the limit and how much to cut, trimmed as it is sent', () => {
    const limit = textLimit(10, 'The note');
    const schema = limited(z.string().trim(), limit);
    expect(schema.safeParse(`  ${'x'.repeat(10)}  `).success).toBe(true);
    expect(schema.safeParse('x'.repeat(13)).error?.issues[0]?.message).toBe('The note is at most 10 characters: shorten it by 3.');
    expect(findings.commentSchema.safeParse({ text: 'x'.repeat(findings.COMMENT_MAX + 1) }).error?.issues[0]?.message).toBe(
      findings.COMMENT_LIMIT.tooLong(findings.COMMENT_MAX + 1),
    );
  });
});
