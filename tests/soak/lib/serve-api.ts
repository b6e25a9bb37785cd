// The API alone (no in-process worker), on a free loopback port: the soak runner starts workers
// as separate processes so it can kill them, and measures this process under load.
import type { AddressInfo } from 'node:net';
import { createContext } from '../../../api/src/bootstrap';
import { loadConfig } from '../../../api/src/config';
import { startServer } from '../../../api/src/server';

const ctx = await createContext(loadConfig({ ...process.env, PORT: '0' }));
const server = await startServer(ctx);
process.stdout.write(`listening ${(server.address() as AddressInfo).port}\n`);
process.on('SIGTERM', () => {
  server.close(() => {
    void ctx.db.destroy().finally(() => process.exit(0));
  });
});
