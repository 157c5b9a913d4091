import type { Invitation } from '@/lib/schemas';

export const invitationStatusLabels: Record<Invitation['status'], string> = {
  pending: 'Pending',
  accepted: 'Accepted',
  expired: 'Expired',
  revoked: 'Revoked',
};
