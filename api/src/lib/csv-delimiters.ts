/** The CSV delimiters the API reads and writes, by the name a request gives each (a tab is `tab`). */
const DELIMITERS: Record<string, string> = { ',': ',', ';': ';', tab: '\t', '|': '|' };

/** In order of preference: upload detection keeps the first of two that a header holds equally often. */
export const CSV_DELIMITERS: readonly string[] = Object.values(DELIMITERS);

/** The delimiter a request names; OpenAPI has already limited the name to the four above. */
export const delimiterNamed = (name: string): string => DELIMITERS[name]!;

/** The name a response gives a stored delimiter. */
export const delimiterName = (delimiter: string): string => Object.keys(DELIMITERS).find((name) => DELIMITERS[name] === delimiter) ?? delimiter;
