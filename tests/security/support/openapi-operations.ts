import { readFileSync } from 'node:fs';
import { parse as parseYaml } from 'yaml';
import { parsePointer } from '@gridwright/shared/json-pointer';
import { openapiPath } from '../../../api/src/app';

export const HTTP_METHODS = ['get', 'put', 'post', 'delete', 'patch', 'head', 'options'] as const;
export type HttpMethod = (typeof HTTP_METHODS)[number];

export interface Operation {
  method: HttpMethod;
  /** The OpenAPI path template, e.g. `/v1/runs/{id}`. */
  path: string;
  operationId: string;
  /** The action of the permission matrix the operation needs (`x-permission`), when it needs one. */
  permission: string | null;
  /** True when the operation (or the document) requires credentials. */
  secured: boolean;
  pathParams: string[];
  requestContentTypes: string[];
  raw: Record<string, any>;
}

export function loadOpenApi(): Record<string, any> {
  return parseYaml(readFileSync(openapiPath, 'utf8'));
}

/** Every operation of openapi/openapi.yaml, so tests generated from it cover a new route without edits. */
export function listOperations(doc: Record<string, any> = loadOpenApi()): Operation[] {
  const ops: Operation[] = [];
  const docSecured = Array.isArray(doc.security) && doc.security.length > 0;
  for (const [path, item] of Object.entries<Record<string, any>>(doc.paths ?? {})) {
    for (const method of HTTP_METHODS) {
      const op = item[method];
      if (!op) continue;
      const security = op.security ?? doc.security;
      const params = [...(item.parameters ?? []), ...(op.parameters ?? [])].map((p: any) => resolveRef(doc, p));
      ops.push({
        method,
        path,
        operationId: op.operationId ?? `${method} ${path}`,
        permission: typeof op['x-permission'] === 'string' ? op['x-permission'] : null,
        secured: op.security ? op.security.length > 0 && !op.security.every((s: object) => Object.keys(s).length === 0) : docSecured,
        pathParams: [...path.matchAll(/\{([^}]+)\}/g)].map((m) => m[1]),
        requestContentTypes: Object.keys(resolveRef(doc, op.requestBody ?? {}).content ?? {}),
        raw: { ...op, parameters: params, security },
      });
    }
  }
  return ops;
}

export function resolveRef(doc: Record<string, any>, node: any): any {
  if (!node || typeof node !== 'object' || typeof node.$ref !== 'string') return node;
  const parts = parsePointer(node.$ref.replace(/^#/, ''));
  let target: any = doc;
  for (const p of parts) target = target?.[p];
  return resolveRef(doc, target);
}

/** `/v1/runs/{id}` with each parameter replaced by the given values (or a placeholder). */
export function fillPath(path: string, values: Record<string, string>): string {
  return path.replace(/\{([^}]+)\}/g, (_m, name: string) => encodeURIComponent(values[name] ?? '00000000-0000-4000-8000-000000000000'));
}

/** The operations under /v1 (the API proper, as opposed to the service endpoints). */
export const apiOperations = (doc?: Record<string, any>) => listOperations(doc).filter((o) => o.path.startsWith('/v1/'));
