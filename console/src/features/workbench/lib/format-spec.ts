const numberArray = /\[\n\s*(-?\d[\d.eE+-]*(?:,\n\s*-?\d[\d.eE+-]*)*)\n\s*\]/g;

/** Pretty JSON with arrays of numbers kept on one line, so a 96-step series is one line, not 96. */
export function formatSpec(value: unknown): string {
  return JSON.stringify(value, null, 2).replace(numberArray, (_m, body: string) => `[${body.split(/,\n\s*/).join(', ')}]`);
}
