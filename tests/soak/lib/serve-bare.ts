// The yardstick for the load figures: a bare Express 5 app with a JSON body parser and two JSON
// routes, no auth, no database. Gridwright's routes are reported as a ratio of this. With
// BARE_GET_BODY (a JSON file) the GET route answers that document, serialised per request as
// Express does, so a comparison can serve a body of the same size as the route it is compared with.
import { readFileSync } from 'node:fs';
import express from 'express';

const app = express();
app.use(express.json());
const item = { id: '3f1c2a9e-8b47-4d1a-9c55-2e7f0d6b1a42', status: 'succeeded', createdAt: new Date().toISOString(), links: { self: '/bare/x' } };
const getBody: Record<string, unknown> | null = process.env.BARE_GET_BODY ? JSON.parse(readFileSync(process.env.BARE_GET_BODY, 'utf8')) : null;
app.get('/bare/:id', (req, res) => {
  res.json({ ...(getBody ?? item), id: req.params.id });
});
app.post('/bare', (req, res) => {
  res.status(202).json({ ...item, status: 'queued', steps: req.body?.horizon?.steps ?? null });
});
const server = app.listen(0, '127.0.0.1', () => {
  const address = server.address();
  process.stdout.write(`listening ${typeof address === 'object' && address ? address.port : 0}\n`);
});
process.on('SIGTERM', () => server.close(() => process.exit(0)));
