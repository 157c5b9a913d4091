import type { CampaignRole, Invitation } from '@/lib/schemas';

export const roleLabels: Record<CampaignRole, string> = { lead: 'Lead', scientist: 'Scientist', pilot: 'Pilot', guest: 'Guest' };

/** "as a scientist", for sentences. */
export const roleWithArticle: Record<CampaignRole, string> = {
  lead: 'a lead',
  scientist: 'a scientist',
  pilot: 'a pilot',
  guest: 'a guest',
};

/** One line each on what the role may do in a campaign. */
export const roleDescriptions: Record<CampaignRole, string> = {
  lead: 'Runs the campaign: team and invitations, tags, dives, any entry, verifications, digests and exports.',
  scientist: 'Logs and edits their own entries, proposes and verifies identifications, uploads photos, exports.',
  pilot: 'Plans and runs dives and their phases, uploads telemetry logs, sets the video clock, logs operations.',
  guest: 'Reads the whole campaign and logs and edits their own entries; manages their own digest.',
};

export const roleOrder: CampaignRole[] = ['lead', 'scientist', 'pilot', 'guest'];

export const invitationStatusLabels: Record<Invitation['status'], string> = {
  pending: 'Pending',
  accepted: 'Accepted',
  expired: 'Expired',
  revoked: 'Revoked',
};
