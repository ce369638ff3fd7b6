/** The small part of an OpenAPI 3.1 document the API reference page reads. */
export interface JsonSchema {
  type?: string | string[];
  properties?: Record<string, JsonSchema>;
  required?: string[];
  items?: JsonSchema;
  enum?: unknown[];
  const?: unknown;
  oneOf?: JsonSchema[];
  anyOf?: JsonSchema[];
  allOf?: JsonSchema[];
  format?: string;
  default?: unknown;
  minimum?: number;
  maximum?: number;
  exclusiveMinimum?: number;
  exclusiveMaximum?: number;
  minLength?: number;
  maxLength?: number;
  description?: string;
}

interface MediaType {
  schema?: JsonSchema;
}

export interface Operation {
  summary?: string;
  description?: string;
  tags?: string[];
  parameters?: { name: string; in: string; required?: boolean; schema?: JsonSchema }[];
  requestBody?: { content?: Record<string, MediaType> };
  responses?: Record<string, { description?: string; content?: Record<string, MediaType> }>;
  'x-tacet-access'?: string;
}

export interface OpenApiDocument {
  info: { title: string; version: string; description?: string };
  paths: Record<string, Record<string, Operation>>;
}

export interface OperationEntry {
  method: string;
  path: string;
  operation: Operation;
}

/** Operations grouped by their first tag, in the order the description lists them. */
export function operationsByTag(doc: OpenApiDocument): [string, OperationEntry[]][] {
  const groups = new Map<string, OperationEntry[]>();
  for (const [path, methods] of Object.entries(doc.paths)) {
    for (const [method, operation] of Object.entries(methods)) {
      const tag = operation.tags?.[0] ?? 'other';
      if (!groups.has(tag)) groups.set(tag, []);
      groups.get(tag)!.push({ method, path, operation });
    }
  }
  return [...groups.entries()];
}

/** A one-line type such as `number ≥ 0`, `"sqrtN" | "knee"` or `array of object`. */
export function describeType(schema: JsonSchema): string {
  if (schema.const !== undefined) return JSON.stringify(schema.const);
  if (schema.enum) return schema.enum.map((v) => JSON.stringify(v)).join(' | ');
  const variants = schema.oneOf ?? schema.anyOf;
  if (variants) return variants.map(describeType).join(' | ');
  const type = Array.isArray(schema.type) ? schema.type.join(' | ') : (schema.type ?? 'any');
  if (type === 'array') return `array of ${schema.items ? describeType(schema.items) : 'any'}`;
  const bounds: string[] = [];
  if (schema.format) bounds.push(schema.format);
  if (schema.minimum !== undefined) bounds.push(`≥ ${schema.minimum}`);
  if (schema.exclusiveMinimum !== undefined) bounds.push(`> ${schema.exclusiveMinimum}`);
  if (schema.maximum !== undefined) bounds.push(`≤ ${schema.maximum}`);
  if (schema.exclusiveMaximum !== undefined) bounds.push(`< ${schema.exclusiveMaximum}`);
  if (schema.minLength !== undefined || schema.maxLength !== undefined) bounds.push(`length ${schema.minLength ?? 0}–${schema.maxLength ?? '∞'}`);
  return bounds.length ? `${type} (${bounds.join(', ')})` : type;
}
