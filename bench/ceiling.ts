/**
 * The ceiling of this stack, as a child process of bench/run.ts: a bare express 5 app that parses the same
 * request body the same way the service does (express.json, the service's default body limit and media types)
 * and answers a fixed small JSON. Nothing else: no validation, no rules, no audit.
 */
import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import express from 'express';
import { loadConfig } from '../src/config/config.js';
import { onStop, reportRss, send } from './ipc.js';

const cfg = loadConfig(process.env);
const app = express();
app.disable('x-powered-by');
const json = express.json({ limit: cfg.TIDEMARK_BODY_LIMIT, type: ['application/json', 'application/fhir+json', 'application/*+json'] });
const answer = { cards: [] };
app.post('/cds-services/:id', json, (req, res) => {
  res.status(req.body && typeof req.body === 'object' ? 200 : 400).json(answer);
});

const server: Server = app.listen(0, '127.0.0.1', () => {
  reportRss();
  send({ type: 'ready', url: `http://127.0.0.1:${(server.address() as AddressInfo).port}` });
});
server.keepAliveTimeout = 30_000;
onStop(
  () =>
    new Promise<void>((r) => {
      server.close(() => r());
      server.closeAllConnections();
    }),
);
