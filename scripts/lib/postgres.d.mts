export interface Cluster {
  url: string;
  port: number;
  dir: string;
  startedHere: boolean;
  stop(): void;
  forceStop(): void;
  restart(): void;
}
export function findPostgresBinDir(): string | null;
export function ensurePostgresInstalled(log: (message: string) => void): string;
export function resolveClusterDir(dataRoot: string): { dir: string; relocated: boolean };
export function freePort(preferred?: number): Promise<number>;
export function startCluster(opts: {
  bin: string;
  dir: string;
  database?: string;
  ephemeral?: boolean;
  log?: (message: string) => void;
}): Promise<Cluster>;
export function readRecordedCluster(dataRoot: string): { port: number; dir: string } | null;
