// The entity classes and migrations TypeORM knows about. Listed explicitly (no globs) so that tsx,
// Vitest and the CLIs all load the same class objects.
type Constructor = new (...args: any[]) => unknown;

export const entities: Constructor[] = [];

export const migrations: Constructor[] = [];
