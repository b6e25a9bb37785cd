import { ROLE_KIND, type SeriesKind, type SeriesRole } from '@gridwright/shared/series-roles';

/**
 * The role each column of one file most likely plays, from the words of its header and its kind:
 * a suggestion the upload answer and the console offer, which the person or client confirms. Each
 * role goes to one column at most, the first that names it; an unnamed power column is taken for
 * the supply and an unnamed price for the import price when nothing else claims them.
 */
const WORDS: [SeriesRole, RegExp][] = [
  ['reserve', /reserve|spinning/i],
  ['siteLoad', /load|demand|consum|usage|verbrauch/i],
  ['supply', /pv|solar|wind|hydro|avail|supply|generat|produc|yield|einspeis|erzeug/i],
  ['exportPrice', /export|feed|sell|inject|einspeis/i],
  ['importPrice', /import|buy|purchase|bezug/i],
  ['storeDemand', /./],
];

const FALLBACK: Partial<Record<SeriesKind, SeriesRole>> = { power: 'supply', price: 'importPrice' };

export function suggestRoles(columns: { name: string; kind: SeriesKind }[]): (SeriesRole | null)[] {
  const taken = new Set<SeriesRole>();
  const claim = (role: SeriesRole | undefined) => {
    if (!role || taken.has(role)) return null;
    taken.add(role);
    return role;
  };
  const byWords = columns.map(({ name, kind }) => claim(WORDS.find(([role, words]) => ROLE_KIND[role] === kind && !taken.has(role) && words.test(name))?.[0]));
  return byWords.map((role, i) => role ?? claim(FALLBACK[columns[i].kind]));
}
