import bcrypt from 'bcryptjs';
import type { Config } from '../config';
import { validationProblem } from '../lib/problem';

export const PASSWORD_MIN_LENGTH = 10;

export function assertPasswordAcceptable(password: string, pointer = '/password'): void {
  if (password.length < PASSWORD_MIN_LENGTH) throw validationProblem([{ pointer, message: `at least ${PASSWORD_MIN_LENGTH} characters` }]);
  // bcrypt reads only the first 72 bytes; a longer password would silently be truncated.
  if (Buffer.byteLength(password) > 72) throw validationProblem([{ pointer, message: 'at most 72 bytes' }]);
}

export const hashPassword = (config: Config, password: string) => bcrypt.hash(password, config.bcryptRounds);

const unknownAccountHashes = new Map<number, Promise<string>>();

/**
 * What a password is compared against when no account matches. Its cost is the one stored hashes
 * are made with (BCRYPT_ROUNDS), so an unknown address takes as long to refuse as a wrong password
 * for a real account; a cheaper dummy made real accounts about four times slower to refuse.
 */
export function unknownAccountHash(config: Pick<Config, 'bcryptRounds'>): Promise<string> {
  let hash = unknownAccountHashes.get(config.bcryptRounds);
  if (!hash) unknownAccountHashes.set(config.bcryptRounds, (hash = bcrypt.hash('gridwright-no-such-account', config.bcryptRounds)));
  return hash;
}

export async function verifyPassword(config: Pick<Config, 'bcryptRounds'>, password: string, hash: string | null): Promise<boolean> {
  const ok = await bcrypt.compare(password, hash ?? (await unknownAccountHash(config)));
  return ok && hash !== null;
}
