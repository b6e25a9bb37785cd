export interface SnippetInput {
  origin: string;
  /** The spec as the user has it; compacted so the snippet stays one request. */
  spec: unknown;
  /** How the snippet refers to the key: an environment variable named after the picked key. */
  keyVariable: string;
}

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

/** GRIDWRIGHT_KEY_<NAME>: a shell-safe variable name derived from the key's name. */
export function keyVariableName(keyName: string | null | undefined): string {
  const suffix = (keyName ?? '').toUpperCase().replace(/[^A-Z0-9]+/g, '_').replace(/^_+|_+$/g, '');
  return suffix ? `GRIDWRIGHT_KEY_${suffix}` : 'GRIDWRIGHT_KEY';
}
