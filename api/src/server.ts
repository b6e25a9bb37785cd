import type { Server } from 'node:http';
import { buildApp } from './app';
import type { AppContext } from './context';

export function startServer(ctx: AppContext): Promise<Server> {
  const app = buildApp(ctx);
  return new Promise((resolve, reject) => {
    const server = app.listen(ctx.config.port, ctx.config.host, () => resolve(server));
    server.on('error', reject);
  });
}
