import { Router, type RequestHandler } from 'express';
import { z } from 'zod';

import { mailLogQuerySchema, type MailLog } from '../../lib/schemas';
import type { AppContext } from '../context';
import { forbidden, notFound } from '../errors';
import { requireSession, userOf } from '../middleware/session';
import { mailLog, retryMail } from '../services/mail-queue';

/** The site administrator's mail log, and the caught mail that outside checks read. */
export function mailRoutes(ctx: AppContext): Router {
  const { db, auth, mailer } = ctx;
  const r = Router();
  const signedIn = requireSession(auth);
  const siteAdmin: RequestHandler = (req, _res, next) => {
    if (userOf(req).siteRole !== 'admin') throw forbidden('Only the site administrator may do this.');
    next();
  };

  r.get('/admin/mail', signedIn, siteAdmin, (req, res) => {
    const query = mailLogQuerySchema.parse(req.query);
    const body: MailLog = { ...mailLog(db, query), caught: mailer.catching ? mailer.caught(query.limit) : null };
    res.json(body);
  });

  // Send a failed mail again (the lead of a new campaign cannot: they have not joined yet).
  r.post('/admin/mail/:mailId/retry', signedIn, siteAdmin, (req, res) => {
    const status = retryMail(db, req.params.mailId as string);
    if (!status) throw notFound();
    ctx.mail.kick();
    res.json(status);
  });

  // The caught mail alone, as it has always been read, while the built-in catcher runs.
  const caughtQuery = z.object({ limit: z.coerce.number().int().min(1).max(500).default(100) }).strict();
  r.get('/dev/outbox', signedIn, siteAdmin, (req, res) => {
    if (!mailer.catching) throw notFound('Mail goes out through SMTP_URL; there is nothing caught to read.');
    res.json(mailer.caught(caughtQuery.parse(req.query).limit));
  });

  return r;
}
