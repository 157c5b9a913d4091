import type { Executor } from '../../db/client';
import { auditLog } from '../../db/schema';

/** One line of the audit trail: who did what to which thing, and when. */
export function audit(
  db: Executor,
  entry: { campaignId: string | null; actorId: string | null; action: string; target?: string | null; detail?: unknown },
  at = new Date(),
): void {
  db.insert(auditLog)
    .values({
      campaignId: entry.campaignId,
      actorId: entry.actorId,
      action: entry.action,
      target: entry.target ?? null,
      detail: entry.detail ?? null,
      at,
    })
    .run();
}
