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

// Compared against when no account matches, so that unknown addresses take as long as known ones.
const UNKNOWN_ACCOUNT_HASH = bcrypt.hashSync('gridwright-no-such-account', 10);

export async function verifyPassword(password: string, hash: string | null): Promise<boolean> {
  const ok = await bcrypt.compare(password, hash ?? UNKNOWN_ACCOUNT_HASH);
  return ok && hash !== null;
}
