export interface TagMapParse {
  tagMap: Record<string, string>;
  /** 1-based line numbers that are neither blank nor `column = tag`. */
  badLines: number[];
}

/** One `column = SCADA tag` per line, so a control-room tag list can be pasted in as it is. */
export function parseTagMapText(text: string): TagMapParse {
  const tagMap: Record<string, string> = {};
  const badLines: number[] = [];
  text.split(/\r?\n/).forEach((raw, i) => {
    const line = raw.trim();
    if (!line || line.startsWith('#')) return;
    const m = /^([^=]+?)\s*=\s*(.+)$/.exec(line);
    if (!m) badLines.push(i + 1);
    else tagMap[m[1]] = m[2];
  });
  return { tagMap, badLines };
}

export function tagMapToText(tagMap: Record<string, string> | undefined): string {
  return Object.entries(tagMap ?? {})
    .map(([k, v]) => `${k} = ${v}`)
    .join('\n');
}
