import { Router } from 'express';

import type { AppContext } from '../context';

/** Photos on observations: upload, serve, edit, retire. */
export function photoRoutes(_ctx: AppContext): Router {
  return Router();
}
