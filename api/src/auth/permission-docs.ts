import { isAction, renderPermissionTable, type Action } from './permissions';

const METHODS = ['get', 'put', 'post', 'delete', 'patch'] as const;

export interface OpenApiOperation {
  'x-permission'?: string;
  security?: unknown[];
  [key: string]: unknown;
}

/** Every /v1 operation of the OpenAPI document with the action its `x-permission` names (undefined when public or missing). */
export function v1Operations(doc: { paths: Record<string, Record<string, unknown>> }) {
  const ops: { method: string; path: string; operation: OpenApiOperation; action: string | undefined }[] = [];
  for (const [path, item] of Object.entries(doc.paths)) {
    if (!path.startsWith('/v1/')) continue;
    for (const method of METHODS) {
      const operation = item[method] as OpenApiOperation | undefined;
      if (operation) ops.push({ method, path, operation, action: operation['x-permission'] });
    }
  }
  return ops;
}

export function permissionTableFromOpenApi(doc: { paths: Record<string, Record<string, unknown>> }): string {
  const routes: Partial<Record<Action, string[]>> = {};
  for (const op of v1Operations(doc)) {
    if (op.action && isAction(op.action)) (routes[op.action] ??= []).push(`${op.method.toUpperCase()} ${op.path}`);
  }
  return renderPermissionTable(routes);
}
