import { useMemo, useState } from 'react';
import { CopyButton } from '@/components/copy-button';
import { SelectField } from '@/components/field';
import { keyVariableName, SNIPPET_LANGUAGES, snippetFor, type SnippetLanguage } from '@/lib/code-snippets';
import { useApiKeys } from '@/lib/queries/api-keys';
import { usePermission } from '@/lib/session';

/**
 * A spec's Solve request as code an integrator can paste into a script: the workbench shows the spec
 * being edited, a run page the exact spec of that run.
 */
export function CodeSnippetPanel({ spec }: { spec: unknown }) {
  const canListKeys = usePermission('keys.read');
  const keys = useApiKeys(false, canListKeys);
  const live = keys.data?.items.filter((k) => !k.revokedAt) ?? [];
  const [keyId, setKeyId] = useState('');
  const [language, setLanguage] = useState<SnippetLanguage>('curl');
  const picked = live.find((k) => k.id === keyId);
  const keyVariable = keyVariableName(picked?.name);
  const code = useMemo(() => snippetFor(language, { origin: window.location.origin, spec, keyVariable }), [language, spec, keyVariable]);
  return (
    <div className="space-y-2" data-testid="code-snippet">
      <div className="flex flex-wrap items-end gap-2">
        <SelectField label="API key" className="w-56" value={keyId} onChange={(e) => setKeyId(e.target.value)}>
          <option value="">Any key (GRIDWRIGHT_KEY)</option>
          {live.map((k) => (
            <option key={k.id} value={k.id}>
              {k.name} · {k.prefix}…
            </option>
          ))}
        </SelectField>
        <div role="radiogroup" aria-label="Language" className="flex rounded-md border border-ash-300 text-xs">
          {SNIPPET_LANGUAGES.map((l) => (
            <button
              key={l.id}
              type="button"
              role="radio"
              aria-checked={language === l.id}
              onClick={() => setLanguage(l.id)}
              className={`px-2.5 py-1.5 ${language === l.id ? 'bg-ash-900 text-white' : 'text-ash-700'}`}
            >
              {l.label}
            </button>
          ))}
        </div>
        <CopyButton text={code} />
      </div>
      <p className="text-xs text-ash-500">
        Secrets are shown once, when a key is created, so the code reads it from <code className="font-mono">{keyVariable}</code>
        {picked && <> — set it to the secret of <strong>{picked.name}</strong> ({picked.prefix}…)</>}.
      </p>
      <pre className="max-h-80 overflow-auto rounded-md bg-ash-900 p-3 font-mono text-[11.5px] leading-relaxed text-ash-100" aria-label="Code">
        {code}
      </pre>
    </div>
  );
}
