export interface SnippetInput {
  origin: string;
  /** The spec to submit; compacted in the shell command so it stays one request. */
  spec: unknown;
  /** How the snippet refers to the key: an environment variable named after the picked key. */
  keyVariable: string;
}

export const SNIPPET_LANGUAGES = [
  { id: 'curl', label: 'curl' },
  { id: 'ts', label: 'TypeScript fetch' },
  { id: 'python', label: 'Python requests' },
] as const;
export type SnippetLanguage = (typeof SNIPPET_LANGUAGES)[number]['id'];

/** The Solve request as a shell command, with the key read from the environment rather than pasted in. */
export function curlSnippet({ origin, spec, keyVariable }: SnippetInput): string {
  const body = JSON.stringify(spec).replace(/'/g, `'\\''`);
  return [
    `curl -sS -X POST '${origin}/v1/runs' \\`,
    `  -H "Authorization: Bearer $${keyVariable}" \\`,
    `  -H 'Content-Type: application/json' \\`,
    `  -H "Idempotency-Key: $(uuidgen)" \\`,
    `  --data-binary '${body}'`,
  ].join('\n');
}

export function fetchSnippet({ origin, spec, keyVariable }: SnippetInput): string {
  return `const spec = ${JSON.stringify(spec, null, 2)};

const res = await fetch('${origin}/v1/runs', {
  method: 'POST',
  headers: {
    Authorization: \`Bearer \${process.env.${keyVariable}}\`,
    'Content-Type': 'application/json',
    'Idempotency-Key': crypto.randomUUID(),
  },
  body: JSON.stringify(spec),
});
if (res.status !== 202) throw new Error(\`Gridwright refused the spec: \${JSON.stringify(await res.json())}\`);
const run = await res.json();

// Poll until the run settles (or register a webhook endpoint and wait for run.succeeded).
let current = run;
while (current.status === 'queued' || current.status === 'running') {
  await new Promise((r) => setTimeout(r, 1000));
  current = await (await fetch(\`${origin}/v1/runs/\${run.id}\`, {
    headers: { Authorization: \`Bearer \${process.env.${keyVariable}}\` },
  })).json();
}
console.log(current.status, current.objective);`;
}

/** JSON literals that Python reads the same way: true, false and null become True, False and None. */
function pythonLiteral(value: unknown): string {
  return JSON.stringify(value, null, 4).replace(/("(?:[^"\\]|\\.)*")|\b(true|false|null)\b/g, (match, quoted: string | undefined, word: string | undefined) =>
    quoted ?? (word === 'true' ? 'True' : word === 'false' ? 'False' : 'None'),
  );
}

export function pythonSnippet({ origin, spec, keyVariable }: SnippetInput): string {
  return `import os
import time
import uuid

import requests

spec = ${pythonLiteral(spec)}

headers = {"Authorization": f"Bearer {os.environ['${keyVariable}']}"}
res = requests.post(
    "${origin}/v1/runs",
    json=spec,
    headers={**headers, "Idempotency-Key": str(uuid.uuid4())},
    timeout=30,
)
if res.status_code != 202:
    raise RuntimeError(f"Gridwright refused the spec: {res.text}")
run = res.json()

# Poll until the run settles (or register a webhook endpoint and wait for run.succeeded).
while run["status"] in ("queued", "running"):
    time.sleep(1)
    run = requests.get(f"${origin}/v1/runs/{run['id']}", headers=headers, timeout=30).json()
print(run["status"], run.get("objective"))`;
}

export function snippetFor(language: SnippetLanguage, input: SnippetInput): string {
  return language === 'curl' ? curlSnippet(input) : language === 'ts' ? fetchSnippet(input) : pythonSnippet(input);
}

/** GRIDWRIGHT_KEY_<NAME>: a shell-safe variable name derived from the key's name. */
export function keyVariableName(keyName: string | null | undefined): string {
  const suffix = (keyName ?? '').toUpperCase().replace(/[^A-Z0-9]+/g, '_').replace(/^_+|_+$/g, '');
  return suffix ? `GRIDWRIGHT_KEY_${suffix}` : 'GRIDWRIGHT_KEY';
}
