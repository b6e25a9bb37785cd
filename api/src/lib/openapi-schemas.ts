/**
 * The component schemas of `openapi/openapi.yaml` that the zod contract owns — the site spec and
 * its parts (request bodies), the result and the run (responses) — rendered from the schemas in
 * `shared/src/` and written between two marker lines, so the hand-written rest of the document
 * (paths, parameters, examples, other components) stays as it is.
 */
import { Document, Scalar, visit } from 'yaml';
import { z } from 'zod';
import { revisionComponents, revisionRequestComponents } from '@gridwright/shared/revisions';
import { runComponents } from '@gridwright/shared/run-result';
import { siteSpecComponents } from '@gridwright/shared/site-spec';
import { studyComponents, studyRequestComponents } from '@gridwright/shared/studies';

export const GENERATED_SCHEMAS_START = '    # generated-schemas:start — `npm run gen:openapi` writes these from the zod schemas in shared/src; edit those, not this block';
export const GENERATED_SCHEMAS_END = '    # generated-schemas:end';

type JsonSchema = Record<string, unknown>;
type Io = 'input' | 'output';
type Registry = z.core.$ZodRegistry<{ id: string }>;

/**
 * Every registry of the contract, each rendered as clients write it (requests) or as the API writes
 * it (responses). The site spec and the run are written out whole; the re-plan and study schemas
 * refer to the parts those two name (the site spec, a run status, the objective terms).
 */
const REGISTRIES: { registry: Registry; io: Io; refersToOthers: boolean }[] = [
  { registry: siteSpecComponents, io: 'input', refersToOthers: false },
  { registry: runComponents, io: 'output', refersToOthers: false },
  { registry: revisionRequestComponents, io: 'input', refersToOthers: true },
  { registry: revisionComponents, io: 'output', refersToOthers: true },
  { registry: studyRequestComponents, io: 'input', refersToOthers: true },
  { registry: studyComponents, io: 'output', refersToOthers: true },
];

const componentUri = (id: string) => `#/components/schemas/${id}`;

/**
 * What zod spells out that a reader does not need: a `format` says what zod's regex says, and an
 * integer needs no safe-integer bounds. A response is described as the API writes it: its defaults
 * are already applied, and a client should expect fields to be added.
 */
const tidy =
  (io: Io, own: Registry | null) =>
  ({ zodSchema, jsonSchema }: { zodSchema: z.core.$ZodType; jsonSchema: JsonSchema }) => {
    const elsewhere = own && REGISTRIES.find(({ registry }) => registry !== own && registry.has(zodSchema))?.registry;
    if (elsewhere) {
      for (const key of Object.keys(jsonSchema)) delete jsonSchema[key];
      jsonSchema.$ref = componentUri(elsewhere.get(zodSchema)!.id);
      return;
    }
    if (jsonSchema.format && jsonSchema.pattern) delete jsonSchema.pattern;
    if (jsonSchema.type === 'integer' && jsonSchema.minimum === Number.MIN_SAFE_INTEGER) delete jsonSchema.minimum;
    if (jsonSchema.type === 'integer' && jsonSchema.maximum === Number.MAX_SAFE_INTEGER) delete jsonSchema.maximum;
    const names = jsonSchema.propertyNames as JsonSchema | undefined;
    if (names && Object.keys(names).length === 1 && names.type === 'string') delete jsonSchema.propertyNames;
    if (io === 'output') {
      delete jsonSchema.default;
      if (jsonSchema.additionalProperties === false) delete jsonSchema.additionalProperties;
    }
  };

/** Keywords in the order a person reads a schema: what it is, then its limits, then what it contains. */
const KEYWORD_ORDER = ['$ref', 'type', 'enum', 'const', 'format', 'description', 'default', 'example'];
const NESTED = ['required', 'additionalProperties', 'properties', 'items', 'prefixItems', 'anyOf', 'oneOf', 'allOf'];
const rank = (key: string) => {
  if (KEYWORD_ORDER.includes(key)) return KEYWORD_ORDER.indexOf(key);
  if (NESTED.includes(key)) return 100 + NESTED.indexOf(key);
  return 50;
};

/** `{ anyOf: [{ type: string, format: date-time }, { type: 'null' }] }` reads better as one type with null, as zod writes bare types. */
function nullableFormat(schema: JsonSchema): JsonSchema {
  const [value, nothing, ...more] = (schema.anyOf as JsonSchema[] | undefined) ?? [];
  if (more.length || !value || !nothing || JSON.stringify(nothing) !== '{"type":"null"}') return schema;
  if (Object.keys(value).sort().join() !== 'format,type' || typeof value.type !== 'string') return schema;
  const { anyOf: _branches, ...rest } = schema;
  return { ...rest, type: [value.type, 'null'], format: value.format };
}

function ordered(schema: unknown): unknown {
  if (Array.isArray(schema)) return schema.map(ordered);
  if (!schema || typeof schema !== 'object') return schema;
  const entries = Object.entries(nullableFormat(schema as JsonSchema)).sort(([a], [b]) => rank(a) - rank(b));
  return Object.fromEntries(
    entries.map(([key, value]) => {
      if (key === 'properties') return [key, Object.fromEntries(Object.entries(value as JsonSchema).map(([name, s]) => [name, ordered(s)]))];
      if (['items', 'prefixItems', 'anyOf', 'oneOf', 'allOf', 'additionalProperties'].includes(key)) return [key, ordered(value)];
      return [key, value];
    }),
  );
}

/**
 * One registry's schemas, wholes before parts: each part is registered before the schema that
 * uses it, so reversing the registration order reads top-down.
 */
function componentsOf({ registry, io, refersToOthers }: (typeof REGISTRIES)[number]): [string, unknown][] {
  const override = tidy(io, refersToOthers ? registry : null);
  const { schemas } = z.toJSONSchema(registry, { io, uri: componentUri, override, unrepresentable: 'throw' }) as {
    schemas: Record<string, JsonSchema>;
  };
  if ('__shared' in schemas) throw new Error(`a schema reached from ${Object.keys(schemas).join(', ')} is used twice without a name: register it`);
  return Object.entries(schemas)
    .reverse()
    .map(([id, schema]) => {
      const { $schema: _dialect, $id: _uri, ...rest } = schema;
      return [id, ordered(rest)];
    });
}

/** Request bodies are read as clients write them (a field with a default is optional); responses as the API writes them. */
export function contractComponentSchemas(): Record<string, unknown> {
  const entries = REGISTRIES.flatMap(componentsOf);
  const ids = entries.map(([id]) => id);
  const twice = ids.filter((id, i) => ids.indexOf(id) !== i);
  if (twice.length) throw new Error(`component names used twice: ${twice.join(', ')}`);
  return Object.fromEntries(entries);
}

/** Short maps and lists on one line and long descriptions folded, as the hand-written components are written. */
const FLOW_WIDTH = 100;
const FOLD_AFTER = 100;

function renderYaml(schemas: Record<string, unknown>): string {
  const doc = new Document(schemas);
  const short = (node: { toJSON(): unknown }) => JSON.stringify(node.toJSON()).length <= FLOW_WIDTH;
  visit(doc, {
    Map: (_key, node) => {
      if (short(node)) node.flow = true;
    },
    Seq: (_key, node) => {
      if (short(node)) node.flow = true;
    },
    Scalar: (_key, node) => {
      if (typeof node.value === 'string' && node.value.length > FOLD_AFTER) node.type = Scalar.BLOCK_FOLDED;
    },
  });
  return doc.toString({ indent: 2, lineWidth: 120, flowCollectionPadding: true, singleQuote: true });
}

/** The document with the block between the markers replaced by freshly generated schemas. */
export function withGeneratedSchemas(openapiText: string): string {
  const start = openapiText.indexOf(`${GENERATED_SCHEMAS_START}\n`);
  const end = openapiText.indexOf(`${GENERATED_SCHEMAS_END}\n`);
  if (start < 0 || end < start) throw new Error(`openapi.yaml needs the lines\n${GENERATED_SCHEMAS_START}\n${GENERATED_SCHEMAS_END}\nunder components/schemas`);
  const body = renderYaml(contractComponentSchemas())
    .trimEnd()
    .split('\n')
    .map((line) => `    ${line}`)
    .join('\n');
  return `${openapiText.slice(0, start)}${GENERATED_SCHEMAS_START}\n${body}\n${openapiText.slice(end)}`;
}
