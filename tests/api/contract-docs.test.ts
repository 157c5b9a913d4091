/**
 * The API reference cannot drift from the app: docs/api.md must name every route the built app
 * serves and every error code of the contract's enum.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';

import type { Express } from 'express';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { errorCodes } from '@/lib/schemas';
import { createApp } from '@/server/app';
import { startTestServer, type TestServer } from '../helpers/test-server';

const docs = readFileSync(path.join(__dirname, '../../docs/api.md'), 'utf8');

type Layer = { route?: { path: string; methods: Record<string, boolean> }; handle?: { stack?: Layer[] } };

/** `METHOD /path` for every route of the app's router, sub-routers mounted under /api included. */
function servedRoutes(app: Express): string[] {
  const out: string[] = [];
  const visit = (layers: Layer[], prefix: string) => {
    for (const layer of layers) {
      if (layer.route) {
        for (const m of Object.keys(layer.route.methods)) {
          if (m === '_all') continue;
          const full = layer.route.path.startsWith('/api') ? layer.route.path : `${prefix}${layer.route.path}`;
          out.push(`${m.toUpperCase()} ${full}`);
        }
      } else if (layer.handle?.stack) visit(layer.handle.stack, '/api');
    }
  };
  visit((app as unknown as { router: { stack: Layer[] } }).router.stack, '');
  return [...new Set(out)].sort();
}

/** Parameter names are the page's own business; `:id` and `:observationId` are the same slot. */
const shape = (route: string) => route.replace(/:\w+/g, ':param');

/**
 * Every route the page names in backticks: `GET /api/x`, `GET, POST /api/x` and `GET /api/x?q=…`
 * (the query is not part of the route).
 */
function documentedRoutes(text: string): Set<string> {
  const out = new Set<string>();
  for (const [, methods, route] of text.matchAll(
    /`((?:GET|POST|PUT|PATCH|DELETE)(?:, (?:GET|POST|PUT|PATCH|DELETE))*) (\/api\/[^\s`?]*)/g,
  )) {
    for (const m of methods!.split(', ')) out.add(shape(`${m} ${route}`));
  }
  return out;
}

let t: TestServer;
beforeAll(async () => {
  t = await startTestServer({ seed: false });
});
afterAll(() => t.close());

describe('docs/api.md', () => {
  it('names every route the app serves', () => {
    const documented = documentedRoutes(docs);
    // better-auth's catch-all stands for its own routes, which the page lists under "Sign-in".
    const served = servedRoutes(createApp(t.ctx)).filter((r) => !r.includes('/api/auth/*'));
    expect(served.length).toBeGreaterThan(40);
    expect(served.filter((r) => !documented.has(shape(r)))).toEqual([]);
  });

  it('names no route the app does not serve', () => {
    const served = new Set(servedRoutes(createApp(t.ctx)).map(shape));
    const stale = [...documentedRoutes(docs)].filter((r) => !r.startsWith('POST /api/auth/') && !r.startsWith('GET /api/auth/'));
    expect(stale.filter((r) => !served.has(r))).toEqual([]);
  });

  it('names every error code', () => {
    const named = new Set([...docs.matchAll(/`([a-z][a-z_]*)`/g)].map((m) => m[1]));
    expect(errorCodes.filter((code) => !named.has(code))).toEqual([]);
  });
});
