/**
 * Who may do what in a campaign: the one table the server's role checks, the services' author
 * rules and the app's buttons all read, so a button is offered exactly when the server would
 * allow it, and the reason it is not offered is the server's own.
 */
import type { CampaignRole } from './schemas';

/** A caller's standing in a campaign: a member's role, or the site administrator who is not a member. */
export type AccessRole = CampaignRole | 'admin';

export const roleOrder: readonly CampaignRole[] = ['lead', 'scientist', 'pilot', 'guest'];

export const roleLabels: Record<CampaignRole, string> = { lead: 'Lead', scientist: 'Scientist', pilot: 'Pilot', guest: 'Guest' };

/** "as a scientist", for sentences. */
export const roleWithArticle: Record<AccessRole, string> = {
  lead: 'a lead',
  scientist: 'a scientist',
  pilot: 'a pilot',
  guest: 'a guest',
  admin: 'the site administrator',
};

/** One line each on what the role may do in a campaign. */
export const roleDescriptions: Record<CampaignRole, string> = {
  lead: 'Runs the campaign: team and invitations, tags, dives, any entry, verifications, digests and exports.',
  scientist: 'Logs and edits their own entries, proposes and verifies identifications, uploads photos, exports.',
  pilot: 'Plans and runs dives and their phases, uploads telemetry logs, sets the video clock, logs operations.',
  guest: 'Reads the whole campaign and logs and edits their own entries; manages their own digest.',
};

/** Facts about the thing acted on that some rules need. */
export type Facts = {
  /** The caller wrote the entry. */
  isAuthor?: boolean;
  /** The caller proposed the entry's current identification. */
  isIdentifier?: boolean;
};

type Rule = {
  /** Roles allowed whatever the facts. */
  roles: readonly AccessRole[];
  /** Members allowed on their own entries only (the author rule). */
  authorRoles?: readonly AccessRole[];
  /** Said to a caller who is refused, after "you may not …" or on its own. */
  refusal: string;
  /** A further refusal from the facts, for callers the roles allow. */
  unless?: (facts: Facts) => string | null;
};

const members: readonly AccessRole[] = ['lead', 'scientist', 'pilot', 'guest'];
const everyone: readonly AccessRole[] = [...members, 'admin'];

export const permissions = {
  'campaign.read': { roles: everyone, refusal: 'read this campaign' },
  'campaign.edit': { roles: ['lead'], refusal: 'change the campaign’s settings' },
  'team.manage': { roles: ['lead'], refusal: 'manage the team' },
  'vocabulary.manage': { roles: ['lead'], refusal: 'manage the tag vocabulary' },
  'substrate.manage': { roles: ['lead'], refusal: 'manage the substrate vocabulary' },
  'checklist.import': { roles: ['lead'], refusal: 'import the species list' },
  'dive.plan': { roles: ['lead', 'pilot'], refusal: 'plan dives' },
  'dive.run': { roles: ['lead', 'pilot'], refusal: 'change the dive' },
  'telemetry.import': { roles: ['lead', 'pilot'], refusal: 'import telemetry logs' },
  'entry.create': { roles: members, refusal: 'log entries' },
  'entry.edit': {
    roles: ['lead'],
    authorRoles: members,
    refusal: 'edit this entry: only its author or a campaign lead may',
  },
  'entry.retire': {
    roles: ['lead'],
    authorRoles: members,
    refusal: 'retire this entry: only its author or a campaign lead may',
  },
  'entry.restore': { roles: ['lead'], refusal: 'restore entries: only a campaign lead may' },
  'entry.seeRetired': { roles: ['lead'], refusal: 'see retired entries: only a campaign lead may' },
  'photo.edit': {
    roles: ['lead'],
    authorRoles: members,
    refusal: 'change this entry’s photos: only its author and the campaign lead may',
  },
  'identification.propose': {
    roles: ['lead', 'scientist'],
    authorRoles: members,
    refusal: 'propose an identification: scientists, leads and the entry’s author may',
  },
  'identification.verify': {
    roles: ['lead', 'scientist'],
    refusal: 'verify identifications: only scientists and leads may',
    unless: (f) =>
      f.isIdentifier || f.isAuthor ? 'Another scientist or a lead must verify this: you proposed the name or wrote the entry.' : null,
  },
  'find.edit': {
    roles: ['lead', 'scientist'],
    authorRoles: members,
    refusal: 'record this find: scientists, leads and the entry’s author may',
  },
  'sample.edit': {
    roles: ['lead'],
    authorRoles: members,
    refusal: 'record this sample: only the entry’s author or a campaign lead may',
  },
  'custody.record': {
    roles: ['lead', 'scientist', 'pilot'],
    authorRoles: ['guest'],
    refusal: 'record hand-overs on this entry: guests record them only on their own entries',
  },
  'digest.send': { roles: ['lead'], refusal: 'send digests' },
  'subscription.manage': { roles: members, refusal: 'subscribe to digests: only members of the campaign may' },
  export: { roles: everyone, refusal: 'export' },
} satisfies Record<string, Rule>;

export type Action = keyof typeof permissions;

/** The roles that may ever do `action` (on their own entries, for the author rules). */
export function rolesFor(action: Action): readonly AccessRole[] {
  const rule: Rule = permissions[action];
  return [...new Set([...rule.roles, ...(rule.authorRoles ?? [])])];
}

/** Why `role` may not do `action` given the facts, in a sentence; null when it may. */
export function refusal(role: AccessRole | undefined, action: Action, facts: Facts = {}): string | null {
  const rule: Rule = permissions[action];
  const byRole = role !== undefined && (rule.roles.includes(role) || (!!facts.isAuthor && !!rule.authorRoles?.includes(role)));
  if (!byRole) {
    return role === undefined
      ? `Only members of the campaign may ${rule.refusal}.`
      : `As ${roleWithArticle[role]} of this campaign you may not ${rule.refusal}.`;
  }
  return rule.unless?.(facts) ?? null;
}

export function can(role: AccessRole | undefined, action: Action, facts: Facts = {}): boolean {
  return refusal(role, action, facts) === null;
}
