import { Router } from 'express';

import type { AppContext } from '../context';

/** The dive's telemetry log: import, samples for charts, values at an instant, statistics. */
export function telemetryRoutes(_ctx: AppContext): Router {
  return Router();
}
