import { buildPointer } from '@gridwright/shared/json-pointer';
import type { z } from 'zod';
import type { ProblemFieldError } from './problem';

/** The most field errors one answer lists, so a bad array of thousands of values stays readable. */
const MAX_REPORTED = 100;

/**
 * zod's issues as field errors with RFC 6901 pointers; zod names the object that has unknown keys, a
 * client wants each key. `unknownKey` says what an unknown key is not, by where it stands.
 */
export function zodIssuePointers(error: z.ZodError, unknownKey: (path: PropertyKey[]) => string): ProblemFieldError[] {
  return error.issues
    .flatMap((issue) =>
      issue.code === 'unrecognized_keys'
        ? issue.keys.map((key) => ({ pointer: buildPointer([...issue.path, key]), message: unknownKey(issue.path) }))
        : [{ pointer: buildPointer(issue.path), message: issue.message }],
    )
    .slice(0, MAX_REPORTED);
}
