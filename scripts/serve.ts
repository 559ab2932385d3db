// Serves the built app: Astro's own handler (static files, then pages and endpoints) behind a plain HTTP
// server that puts the security headers on every response, static files included (the adapter serves those
// before the app's middleware runs). Usage: HOST=127.0.0.1 PORT=4321 node --import tsx scripts/serve.ts
import http from 'node:http';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import { securityHeaders } from '../src/lib/http/security-headers';
import { ROOT } from './lib/processes';

process.env.ASTRO_NODE_AUTOSTART = 'disabled';
const entry = pathToFileURL(path.join(ROOT, 'dist/server/entry.mjs')).href;
const { handler } = (await import(entry)) as { handler: http.RequestListener };

const host = process.env.HOST ?? '127.0.0.1';
const port = Number(process.env.PORT ?? 4321);
const headers = Object.entries(securityHeaders());

const server = http.createServer((req, res) => {
  // Set first: a page's own headers (written later by the app) take precedence over these defaults.
  for (const [name, value] of headers) res.setHeader(name, value);
  handler(req, res);
});
server.on('error', (error: NodeJS.ErrnoException) => {
  console.error(error.code === 'EADDRINUSE' ? `port ${port} on ${host} is already in use` : `server error: ${error.message}`);
  process.exit(1);
});
server.listen(port, host, () => console.log(`listening on http://${host}:${port}`));

const stop = () => server.close(() => process.exit(0));
process.on('SIGTERM', stop);
process.on('SIGINT', stop);
